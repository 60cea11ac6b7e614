/**
 * Command-line front of the Nestwise engine: `npm run --silent nestwise -- analyze FILE ...`.
 * Prints one JSON document on stdout; problems go to stderr as one line with a non-zero exit code.
 */
import { runCli } from './cli/run-cli'

const code = await runCli(process.argv.slice(2), {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
})
process.exitCode = code
