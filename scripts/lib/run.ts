import { spawnSync, type SpawnSyncOptions } from 'node:child_process'

/** Runs a command with inherited output; throws with the command line when it fails. */
export function run(command: string, args: string[], options: SpawnSyncOptions = {}): void {
  const result = spawnSync(command, args, { stdio: 'inherit', ...options })
  if (result.status !== 0) {
    throw new Error(`${command} ${args.join(' ')} failed (exit ${result.status ?? result.signal})`)
  }
}

/** Runs a command and returns its trimmed stdout, or null when it fails. */
export function capture(command: string, args: string[], options: SpawnSyncOptions = {}): string | null {
  const result = spawnSync(command, args, { encoding: 'utf8', ...options })
  return result.status === 0 ? String(result.stdout).trim() : null
}

export function commandExists(command: string): boolean {
  return capture('sh', ['-c', `command -v ${command}`]) !== null
}

const isRoot = process.getuid?.() === 0

/** Debian packages are installed only when missing, and only as root (a developer without root is told what to do). */
export function aptInstall(packages: string[], { noRecommends = false } = {}): void {
  if (!isRoot) {
    throw new Error(`Please install these Debian packages first: ${packages.join(' ')}`)
  }
  console.log(`[setup] installing ${packages.join(' ')} from Debian's packages…`)
  run('apt-get', ['-o', 'DPkg::Lock::Timeout=1800', 'update', '-qq'])
  run(
    'apt-get',
    [
      '-o',
      'DPkg::Lock::Timeout=1800',
      'install',
      '-y',
      '-qq',
      ...(noRecommends ? ['--no-install-recommends'] : []),
      ...packages,
    ],
    { env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } },
  )
}
