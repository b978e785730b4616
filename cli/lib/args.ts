/**
 * Command-line argument helpers shared by `sigmaflow` subcommands: subcommand dispatch, option parsing
 * with positional arguments, bounded numbers and `INDEX=VALUE` assignments, JSON output.
 * File reading, number lists and tables live in ./input-files.ts.
 */
import { type ParseArgsConfig, parseArgs } from "node:util";
import { CliError } from "../errors";

type OptionsConfig = NonNullable<ParseArgsConfig["options"]>;

/**
 * Splits `<command> [args...]` off a group's arguments.
 *
 * @param args - arguments after the group name
 * @param commands - known commands with a one-line description, for the usage text
 * @param group - group name, for messages
 * @returns the command and its arguments, or null when help was asked for (usage is then printed)
 * @throws CliError for a missing or unknown command
 */
export function splitCommand(
  args: readonly string[],
  commands: Readonly<Record<string, string>>,
  group: string,
): { command: string; rest: string[] } | null {
  const [command, ...rest] = args;
  const usage = () =>
    [
      `Usage: sigmaflow ${group} <command> [options]`,
      "",
      "Commands:",
      ...Object.entries(commands).map(([name, text]) => `  ${name.padEnd(12)} ${text}`),
      "",
    ].join("\n");
  if (command === "--help" || command === "-h" || command === "help") {
    process.stdout.write(usage());
    return null;
  }
  if (!command) throw new CliError(`missing command.\n\n${usage()}`);
  if (!(command in commands)) throw new CliError(`unknown command "${command}".\n\n${usage()}`);
  return { command, rest };
}

/**
 * Parses options and positional arguments (node:util parseArgs, strict), turning its errors into user
 * errors.
 *
 * @param args - arguments after the command name
 * @param options - parseArgs option definitions
 * @param positionals - accepted count of positional arguments and their names for messages
 * @returns option values and positionals
 * @throws CliError for unknown options, missing values, or a wrong number of positional arguments
 */
export function parseCommandArgs<const O extends OptionsConfig>(
  args: string[],
  options: O,
  positionals: { names: readonly string[]; min?: number },
) {
  let parsed: ReturnType<
    typeof parseArgs<{ args: string[]; options: O; strict: true; allowPositionals: true }>
  >;
  try {
    parsed = parseArgs({ args, options, strict: true, allowPositionals: true });
  } catch (error) {
    throw new CliError((error as Error).message);
  }
  const min = positionals.min ?? positionals.names.length;
  if (parsed.positionals.length < min) {
    throw new CliError(`missing ${positionals.names.slice(parsed.positionals.length).join(" and ")}.`);
  }
  if (parsed.positionals.length > positionals.names.length) {
    throw new CliError(`unexpected argument "${parsed.positionals[positionals.names.length]}".`);
  }
  return { values: parsed.values, positionals: parsed.positionals };
}

/**
 * Parses a number option with optional bounds.
 *
 * @param text - option value
 * @param name - option name for messages ("--tolerance")
 * @param bounds - inclusive min/max, `integer` to require a whole number, `positive` for > 0
 * @throws CliError when the value is not a (whole) number or out of bounds
 */
export function parseNumberArg(
  text: string,
  name: string,
  bounds: { min?: number; max?: number; integer?: boolean; positive?: boolean } = {},
): number {
  const value = Number(text);
  if (text.trim() === "" || !Number.isFinite(value))
    throw new CliError(`${name}: "${text}" is not a number.`);
  if (bounds.integer && !Number.isInteger(value))
    throw new CliError(`${name}: "${text}" is not a whole number.`);
  if (bounds.positive && !(value > 0)) throw new CliError(`${name}: must be greater than 0, got ${text}.`);
  if (bounds.min !== undefined && value < bounds.min)
    throw new CliError(`${name}: must be at least ${bounds.min}.`);
  if (bounds.max !== undefined && value > bounds.max)
    throw new CliError(`${name}: must be at most ${bounds.max}.`);
  return value;
}

/**
 * Parses repeated or comma-separated `INDEX=VALUE` assignments of whole numbers, e.g. `--isotope 2=2
 * --isotope 3=2` or `--isotope 2=2,3=2`.
 *
 * @param items - the option values
 * @param name - option name for messages
 * @returns value by index (a later assignment to the same index is an error)
 * @throws CliError for malformed items, non-integers, indices < 1 or repeated indices
 */
export function parseIndexAssignments(items: readonly string[], name: string): Record<number, number> {
  const out: Record<number, number> = {};
  for (const item of items.flatMap((text) => text.split(","))) {
    const match = /^\s*(\d+)\s*=\s*(\d+)\s*$/.exec(item);
    if (!match) throw new CliError(`${name}: "${item}" must look like INDEX=NUMBER, e.g. 2=2.`);
    const index = Number(match[1]);
    const value = Number(match[2]);
    if (index < 1) throw new CliError(`${name}: atom indices start at 1 ("${item}").`);
    if (index in out) throw new CliError(`${name}: atom ${index} is given twice.`);
    out[index] = value;
  }
  return out;
}

/** Prints one JSON document on stdout (pretty-printed, newline-terminated). */
export function writeJson(value: unknown): void {
  process.stdout.write(`${JSON.stringify(value, null, 2)}\n`);
}
