/**
 * Shared input handling for `sigmaflow` subcommands: reading text/JSON/CSV files, parsing number lists
 * such as `0.5,1:100:50`, turning science-core input errors into user errors, and a plain-text table
 * printer for the default (non-JSON) output.
 */
import { readFileSync } from "node:fs";
import { type ParseArgsConfig, parseArgs } from "node:util";
import { ScienceInputError } from "../../shared/science/errors";
import { CliError } from "../errors";

/**
 * Reads a UTF-8 text file.
 *
 * @param path - file path as given on the command line
 * @param what - what the file is, for messages ("orbital file")
 * @throws CliError when the file cannot be read
 */
export function readTextFile(path: string, what: string): string {
  try {
    return readFileSync(path, "utf8");
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason =
      code === "ENOENT" ? "no such file" : code === "EISDIR" ? "is a directory" : String(code ?? error);
    throw new CliError(`Cannot read ${what} "${path}": ${reason}.`);
  }
}

/**
 * Reads and parses a JSON file.
 *
 * @throws CliError when the file is missing or not valid JSON (with the parser's position)
 */
export function readJsonFile(path: string, what: string): unknown {
  const text = readTextFile(path, what);
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new CliError(`${what} "${path}" is not valid JSON: ${(error as Error).message}`);
  }
}

/** A CSV table: header names and string cells per data row, with 1-based source line numbers. */
export interface CsvTable {
  header: string[];
  rows: { line: number; cells: string[] }[];
}

/**
 * Parses simple CSV: comma-separated cells, first non-comment line is the header, blank lines and lines
 * starting with `#` are skipped, surrounding whitespace is trimmed. Quoted cells are not supported (the
 * files are numeric tables).
 *
 * @param text - file contents
 * @param what - file description for messages
 * @throws CliError for an empty file or a row with the wrong number of cells
 */
export function parseCsv(text: string, what: string): CsvTable {
  const lines = text.split(/\r?\n/);
  let header: string[] | undefined;
  const rows: CsvTable["rows"] = [];
  lines.forEach((raw, index) => {
    const line = raw.trim();
    if (line === "" || line.startsWith("#")) return;
    const cells = line.split(",").map((cell) => cell.trim());
    if (!header) {
      header = cells;
      return;
    }
    if (cells.length !== header.length) {
      throw new CliError(
        `${what}, line ${index + 1}: expected ${header.length} values (${header.join(",")}), found ${cells.length}.`,
      );
    }
    rows.push({ line: index + 1, cells });
  });
  if (!header) throw new CliError(`${what} is empty (a header line is required).`);
  return { header, rows };
}

/**
 * Extracts numeric columns from a parsed CSV table.
 *
 * @param table - output of {@link parseCsv}
 * @param columns - required column names (exact, case-sensitive)
 * @param what - file description for messages
 * @returns one number array per requested column
 * @throws CliError for a missing column or a cell that is not a finite number
 */
export function numericColumns<const C extends string>(
  table: CsvTable,
  columns: readonly C[],
  what: string,
): Record<C, number[]> {
  const result = {} as Record<C, number[]>;
  for (const column of columns) {
    const index = table.header.indexOf(column);
    if (index < 0) {
      throw new CliError(
        `${what} has no "${column}" column; the header must name ${columns.join(",")} (found ${table.header.join(",")}).`,
      );
    }
    result[column] = table.rows.map(({ line, cells }) => {
      const cell = cells[index]!;
      const value = Number(cell);
      if (cell === "" || !Number.isFinite(value)) {
        throw new CliError(`${what}, line ${line}: "${cell}" in column ${column} is not a number.`);
      }
      return value;
    });
  }
  return result;
}

function parseNumber(text: string, what: string): number {
  const value = Number(text);
  if (text.trim() === "" || !Number.isFinite(value))
    throw new CliError(`${what}: "${text}" is not a number.`);
  return value;
}

/**
 * Parses a number list: comma-separated items, each a number or a range `start:stop:count`
 * (count evenly spaced values from start to stop inclusive) or `start:stop:count:log` (geometric spacing;
 * start and stop > 0). Example: `0.5,1:10:10,20:100:5:log`.
 *
 * @param text - the option value
 * @param what - option name for messages ("--energies-ev")
 * @returns the values in the order given
 * @throws CliError for malformed items, a count that is not a positive integer, or an empty list
 */
export function parseNumberList(text: string, what: string): number[] {
  const values: number[] = [];
  for (const rawItem of text.split(",")) {
    const item = rawItem.trim();
    if (item === "") throw new CliError(`${what}: empty item in "${text}".`);
    if (!item.includes(":")) {
      values.push(parseNumber(item, what));
      continue;
    }
    const parts = item.split(":");
    if (parts.length !== 3 && !(parts.length === 4 && parts[3] === "log")) {
      throw new CliError(`${what}: range "${item}" must be start:stop:count or start:stop:count:log.`);
    }
    const start = parseNumber(parts[0]!, what);
    const stop = parseNumber(parts[1]!, what);
    const count = parseNumber(parts[2]!, what);
    if (!Number.isInteger(count) || count < 1 || count > 10_000_000) {
      throw new CliError(`${what}: the count in "${item}" must be a whole number from 1 to 10000000.`);
    }
    const logarithmic = parts.length === 4;
    if (logarithmic && !(start > 0 && stop > 0)) {
      throw new CliError(`${what}: a log range needs start and stop > 0 ("${item}").`);
    }
    for (let i = 0; i < count; i++) {
      const fraction = count === 1 ? 0 : i / (count - 1);
      values.push(
        logarithmic
          ? start * (stop / start) ** fraction
          : i === count - 1
            ? stop
            : start + (stop - start) * fraction,
      );
    }
  }
  if (values.length === 0) throw new CliError(`${what}: no values given.`);
  return values;
}

/**
 * Parses command options with node:util parseArgs (strict, no positionals), reporting unknown or malformed
 * options as user errors.
 *
 * @param args - the arguments after the subcommand name
 * @param options - parseArgs option definitions
 * @returns the parsed option values
 * @throws CliError for unknown options, missing option values or stray positional arguments
 */
export function parseOptions<const O extends NonNullable<ParseArgsConfig["options"]>>(
  args: string[],
  options: O,
) {
  try {
    return parseArgs({ args, options, strict: true, allowPositionals: false }).values;
  } catch (error) {
    throw new CliError((error as Error).message);
  }
}

/**
 * Reads a required string option.
 *
 * @throws CliError naming the missing option
 */
export function requireOption(value: string | undefined, name: string): string {
  if (value === undefined || value === "") throw new CliError(`Missing required option ${name}.`);
  return value;
}

/**
 * Parses a single finite number option.
 *
 * @throws CliError when the value is not a number
 */
export function parseNumberOption(value: string, name: string): number {
  return parseNumber(value, name);
}

/**
 * Runs a science-core computation, reporting its input errors as user errors (exit code 2).
 *
 * @param compute - the computation
 * @returns its result
 * @throws CliError carrying the ScienceInputError message
 */
export function withScienceErrors<T>(compute: () => T): T {
  try {
    return compute();
  } catch (error) {
    if (error instanceof ScienceInputError) throw new CliError(error.message);
    throw error;
  }
}

/**
 * Formats rows of cells as a left-aligned, space-padded text table with a header underline.
 *
 * @param header - column titles
 * @param rows - cells per row (already formatted strings)
 * @returns the table text ending in a newline
 */
export function formatTable(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const widths = header.map((title, c) =>
    Math.max(title.length, ...rows.map((row) => (row[c] ?? "").length)),
  );
  const line = (cells: readonly string[]) =>
    cells
      .map((cell, c) => cell.padEnd(widths[c]!))
      .join("  ")
      .trimEnd();
  return `${[line(header), line(widths.map((w) => "-".repeat(w))), ...rows.map(line)].join("\n")}\n`;
}

/** Formats a number for tables: 6 significant digits, exponent form for very small or large values. */
export function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return "0";
  const size = Math.abs(value);
  return size >= 1e-3 && size < 1e6 ? Number(value.toPrecision(6)).toString() : value.toExponential(5);
}
