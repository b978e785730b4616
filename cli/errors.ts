/** An error whose message is shown to the user as is; the process exits with `exitCode`. */
export class CliError extends Error {
  constructor(
    message: string,
    readonly exitCode = 2,
  ) {
    super(message);
    this.name = "CliError";
  }
}
