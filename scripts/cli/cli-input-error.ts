/**
 * A problem with what the user handed the command line (file, column names, flags). The command
 * prints its message as one line on stderr and exits with code 2, without a stack trace.
 */
export class CliInputError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'CliInputError'
  }
}
