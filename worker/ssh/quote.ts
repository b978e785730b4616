/**
 * POSIX shell quoting for the fixed remote commands the worker runs. Every argument travels inside single
 * quotes, where the shell expands nothing; an embedded single quote closes the quote, adds an escaped quote
 * and reopens (`'it'\''s'`). User-supplied values never reach a command line (they travel inside files):
 * quoting protects our own generated paths and ids, including any an administrator configured oddly.
 */

/**
 * Characters that need no quoting in any POSIX shell context (keeps command lines readable in logs). "="
 * is left out: a leading word like `A=b` would be taken as a variable assignment, not a command.
 */
const PLAIN_WORD = /^[A-Za-z0-9_@%+:,./-]+$/;

/** Quotes one argument for /bin/sh. A NUL byte cannot be carried in an argv entry, so it is refused. */
export function shellQuote(arg: string): string {
  if (arg.includes("\0")) throw new Error("shellQuote: argument contains a NUL byte");
  if (arg !== "" && PLAIN_WORD.test(arg)) return arg;
  return `'${arg.replaceAll("'", `'\\''`)}'`;
}

/** Joins an argv into one command line for an SSH exec request; the remote login shell splits it back. */
export function commandLine(argv: readonly string[]): string {
  if (argv.length === 0) throw new Error("commandLine: empty argv");
  return argv.map(shellQuote).join(" ");
}

/**
 * `sh -c <script> sh <args…>`: a fixed script (our own text) with its inputs as positional parameters
 * ($1, $2, …), so the script never interpolates a value and every value is quoted exactly once.
 */
export function shellScript(script: string, args: readonly string[] = []): string[] {
  return ["sh", "-c", script, "sh", ...args];
}
