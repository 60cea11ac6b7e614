import { EngineInputError } from '../../shared/stats/engine-input-error'
import { ANALYZE_HELP, parseAnalyzeArgs } from './analyze-args'
import { CliInputError } from './cli-input-error'
import { PLAN_HELP, parsePlanArgs } from './plan-args'

export interface CliOutput {
  stdout: (text: string) => void
  stderr: (text: string) => void
}

export const MAIN_HELP = `Usage: nestwise <command> [options]

Commands:
  analyze FILE ...   analyse a CSV/TSV table of nested observations (run "nestwise analyze --help")
  plan ...           power, units needed and the cheapest design for a new experiment (run "nestwise plan --help")

Every command prints one JSON document on stdout. Bad input exits with code 2 and a one-line
message on stderr.`

/** Exit codes: 0 success, 1 internal error, 2 bad input. */
export async function runCli(argv: string[], out: CliOutput): Promise<number> {
  const [command, ...rest] = argv
  try {
    if (command === undefined || command === '--help' || command === '-h' || command === 'help') {
      if (command === undefined) {
        out.stderr(MAIN_HELP + '\n')
        return 2
      }
      out.stdout(MAIN_HELP + '\n')
      return 0
    }
    if (command === 'analyze') {
      const args = parseAnalyzeArgs(rest)
      if (!args) {
        out.stdout(ANALYZE_HELP + '\n')
        return 0
      }
      // Loaded on demand so each command starts without the other's dependencies.
      const { runAnalyze } = await import('./run-analyze')
      out.stdout(JSON.stringify(await runAnalyze(args)) + '\n')
      return 0
    }
    if (command === 'plan') {
      const args = parsePlanArgs(rest)
      if (!args) {
        out.stdout(PLAN_HELP + '\n')
        return 0
      }
      const { runPlan } = await import('./run-plan')
      out.stdout(JSON.stringify(runPlan(args)) + '\n')
      return 0
    }
    throw new CliInputError(`Unknown command "${command}". Run "nestwise --help".`)
  } catch (error) {
    if (error instanceof CliInputError || error instanceof EngineInputError) {
      out.stderr(`nestwise: ${oneLine(error.message)}\n`)
      return 2
    }
    out.stderr(
      `nestwise: internal error: ${oneLine(error instanceof Error ? error.message : String(error))}\n`,
    )
    return 1
  }
}

function oneLine(message: string): string {
  return message.replace(/\s*\n\s*/g, ' ').trim()
}
