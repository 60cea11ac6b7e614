/** A number given as `--name N` on a benchmark's command line (`npm run bench:x -- --name N`), else the fallback. */
export function numberOption(
  name: string,
  fallback: number,
  args: readonly string[] = process.argv.slice(2),
): number {
  const at = args.indexOf(`--${name}`)
  return at >= 0 ? Number(args[at + 1]) : fallback
}
