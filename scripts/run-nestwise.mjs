/**
 * Starts the command line (`npm run --silent nestwise -- ...`) from a prebuilt bundle of
 * scripts/nestwise.ts. Starting node through tsx and compiling some sixty TypeScript modules cost
 * about a second of CPU per run, more than analysing a million rows; the bundle starts in a tenth of
 * that, and code splitting keeps each command to the code it uses. The bundle is rebuilt with
 * esbuild (a fraction of a second) whenever one of its input files is newer than it, so edits to
 * the engine take effect on the next run.
 *
 * Plain JavaScript on purpose: this file must run before anything is compiled.
 */
import {
  existsSync,
  mkdirSync,
  readdirSync,
  readFileSync,
  renameSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs'
import { basename, dirname, join } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'

const root = join(dirname(fileURLToPath(import.meta.url)), '..')
const folder = join(root, 'node_modules', '.cache', 'nestwise-cli')
const manifestFile = join(folder, 'current.json')
/** Older files of earlier builds are removed; a run that started before the rebuild may still need them. */
const KEEP_OLD_FILES_MS = 10 * 60 * 1000

/** Writes under a private name, then renames: parallel runs never see a half-written file. */
function writeAtomically(path, contents) {
  const temporary = `${path}.${process.pid}.tmp`
  writeFileSync(temporary, contents)
  renameSync(temporary, path)
}

/** The current build's manifest, or null when it is missing or any of its inputs changed after it. */
function currentBuild() {
  if (!existsSync(manifestFile)) return null
  const builtAt = statSync(manifestFile).mtimeMs
  const manifest = JSON.parse(readFileSync(manifestFile, 'utf8'))
  const changed = manifest.inputs.some(
    (input) => !existsSync(join(root, input)) || statSync(join(root, input)).mtimeMs > builtAt,
  )
  return changed || !existsSync(join(folder, manifest.entry)) ? null : manifest
}

async function rebuild() {
  const { build } = await import('esbuild')
  const result = await build({
    absWorkingDir: root,
    entryPoints: ['scripts/nestwise.ts'],
    outdir: folder,
    // Content-hashed names: a rebuild never overwrites a file another run is loading.
    entryNames: '[name]-[hash]',
    outExtension: { '.js': '.mjs' },
    bundle: true,
    splitting: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    metafile: true,
    write: false,
    logLevel: 'warning',
    // Bundled CommonJS packages call require(); an ES module has none unless it makes one.
    banner: {
      js: "import { createRequire } from 'node:module'; const require = createRequire(import.meta.url);",
    },
  })
  mkdirSync(folder, { recursive: true })
  for (const file of result.outputFiles) if (!existsSync(file.path)) writeAtomically(file.path, file.contents)
  const entry = Object.entries(result.metafile.outputs).find(([, output]) => output.entryPoint)[0]
  const inputs = Object.keys(result.metafile.inputs).filter((input) => !input.startsWith('<'))
  const manifest = { entry: basename(entry), inputs }
  writeAtomically(manifestFile, JSON.stringify(manifest))
  const keep = new Set([...result.outputFiles.map((file) => basename(file.path)), 'current.json'])
  for (const name of readdirSync(folder)) {
    const path = join(folder, name)
    if (!keep.has(name) && Date.now() - statSync(path).mtimeMs > KEEP_OLD_FILES_MS)
      rmSync(path, { force: true })
  }
  return manifest
}

const manifest = currentBuild() ?? (await rebuild())
await import(pathToFileURL(join(folder, manifest.entry)).href)
