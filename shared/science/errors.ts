/**
 * Error thrown by the science core when an input cannot be used (unknown element, inconsistent charge and
 * multiplicity, malformed geometry, invalid grid...). The message is meant to be shown to the user as is;
 * `details` carries machine-readable context (line number, offending value, allowed values).
 */
export class ScienceInputError extends Error {
  constructor(
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "ScienceInputError";
  }
}
