/**
 * Error thrown by a result reader when a collected file cannot be read as results. The message names the
 * file and, where one is at fault, the line (1-based), so a researcher can open the file and see why.
 */
export class ResultReadError extends Error {
  constructor(
    readonly fileName: string,
    readonly line: number | null,
    readonly reason: string,
  ) {
    super(line === null ? `${fileName}: ${reason}` : `${fileName}, line ${line}: ${reason}`);
    this.name = "ResultReadError";
  }
}
