/**
 * Regular expressions written by group members: template regex literals (`r/…/`), output rules and the
 * `pattern`/`patternProperties` of parameter schemas. They run on the server's and the worker's event
 * loop, so they never go to JavaScript's backtracking `RegExp` (where `^(a+)+$` against a few dozen
 * characters takes seconds, doubling per character). They are compiled with re2js, a JavaScript port
 * of RE2 whose matching takes time linear in the text for a given pattern.
 *
 * Patterns are therefore RE2 syntax (https://github.com/google/re2/wiki/Syntax): no backreferences, no
 * lookahead or lookbehind, no possessive quantifiers; named groups are `(?<name>…)` or `(?P<name>…)`.
 * Linear in the text is not free: the cost is the text length times the size of the compiled pattern,
 * and a short pattern can expand to a large program (`x{1000}` is a thousand steps). So a pattern is
 * refused when its source is longer than MAX_PATTERN_LENGTH or its program larger than
 * MAX_PROGRAM_SIZE; counted repetitions are estimated before compiling, so even compiling stays cheap.
 * Callers still keep a time budget of their own (render time limit, per-chunk parsing budget, a
 * validation deadline) as a second line of defence.
 */
import { RE2JS, RE2JSException, RE2JSSyntaxException } from "re2js";

/** Longest pattern source accepted, in UTF-16 code units. */
export const MAX_PATTERN_LENGTH = 500;
/** Largest compiled program accepted, in RE2 instructions (matching costs up to this much per character). */
export const MAX_PROGRAM_SIZE = 1000;
export const RE2_SYNTAX_NOTE =
  "Sigmaflow's patterns are RE2 syntax, without backreferences or lookaround (https://github.com/google/re2/wiki/Syntax)";

/** A pattern Sigmaflow will not run; `reason` is written for the person who wrote the pattern. */
export class PatternError extends Error {
  constructor(
    readonly pattern: string,
    readonly reason: string,
  ) {
    super(reason);
    this.name = "PatternError";
  }
}

/**
 * Flags as in JavaScript: `g` (replace every match), `i`, `m`, `s`; `u` is accepted and changes nothing,
 * since RE2 always matches by code point.
 */
const FLAG_BITS: Record<string, number> = {
  g: 0,
  i: RE2JS.CASE_INSENSITIVE,
  m: RE2JS.MULTILINE,
  s: RE2JS.DOTALL,
  u: 0,
};

/** A compiled user pattern. Stateless (no `lastIndex`), so one instance can be shared. */
export class UserPattern {
  constructor(
    readonly source: string,
    readonly flags: string,
    private readonly re: RE2JS,
  ) {}

  get global(): boolean {
    return this.flags.includes("g");
  }

  get programSize(): number {
    return this.re.programSize();
  }

  /** Whether the pattern matches anywhere in `text` (as `RegExp.prototype.test`). */
  test(text: string): boolean {
    return this.re.test(text);
  }

  /** The named groups of the first match (an empty object without named groups), or null. */
  matchGroups(text: string): Record<string, string | undefined> | null {
    const match = this.re.exec(text) as { groups?: Record<string, string | undefined> } | null;
    if (!match) return null;
    return match.groups ?? {};
  }

  /**
   * Replaces the first match, or every match with the `g` flag. The replacement expands `$1`, `$<name>`,
   * `$&` and `$$` as `String.prototype.replace` does.
   */
  replace(text: string, replacement: string): string {
    const matcher = this.re.matcher(text);
    return this.global ? matcher.replaceAll(replacement) : matcher.replaceFirst(replacement);
  }

  toString(): string {
    return `/${this.source}/${this.flags}`;
  }

  /** `"text".split(pattern)` would otherwise print the pattern and split by that text. */
  [Symbol.split](): never {
    throw new PatternError(this.source, "a pattern cannot split a string; split by a string instead");
  }
}

/**
 * An estimate, made without compiling, of how many RE2 instructions the pattern expands to: each atom
 * counts once, a group counts what it holds, and `{n}`, `{n,m}` or `{n,}` multiply what they repeat.
 * It stays near or below the compiled size, so refusing above the limit refuses nothing the compiled
 * check would accept (except a literal `{n}` quoted with `\Q…\E`, read as a count), and anything it
 * lets through compiles quickly. One pass over the source.
 */
export function estimatedProgramSize(source: string): number {
  type Frame = { sum: number; last: number };
  const stack: Frame[] = [{ sum: 0, last: 0 }];
  let top = stack[0]!;
  const atom = (weight: number) => {
    top.sum += top.last;
    top.last = weight;
  };
  const closeGroup = () => {
    const inner = stack.pop()!;
    top = stack[stack.length - 1]!;
    atom(inner.sum + inner.last);
  };
  for (let i = 0; i < source.length; i += 1) {
    const ch = source[i];
    if (ch === "\\") {
      const next = source[i + 1];
      if ((next === "p" || next === "P" || next === "x") && source[i + 2] === "{") {
        const close = source.indexOf("}", i + 3);
        i = close < 0 ? source.length : close;
      } else {
        i += 1;
      }
      atom(1);
    } else if (ch === "[") {
      let j = i + 1;
      if (source[j] === "^") j += 1;
      if (source[j] === "]") j += 1;
      while (j < source.length && source[j] !== "]") {
        if (source[j] === "\\") j += 1;
        else if (source[j] === "[" && source[j + 1] === ":") {
          const close = source.indexOf(":]", j + 2);
          if (close >= 0) j = close + 1;
        }
        j += 1;
      }
      i = j;
      atom(1);
    } else if (ch === "(") {
      top = { sum: 0, last: 0 };
      stack.push(top);
    } else if (ch === ")") {
      if (stack.length > 1) closeGroup();
    } else if (ch === "|") {
      top.sum += top.last;
      top.last = 0;
    } else if (ch === "{") {
      const count = /^\{(\d{1,9})(,(\d{0,9}))?\}/.exec(source.slice(i, i + 22));
      if (count) {
        const min = Number(count[1]);
        const max = count[2] === undefined ? min : count[3] === "" ? min + 1 : Number(count[3]);
        top.last *= Math.max(max, 1);
        i += count[0].length - 1;
      } else {
        atom(1);
      }
    } else if (ch === "*" || ch === "+" || ch === "?") {
      top.last += 1;
    } else {
      atom(1);
    }
  }
  while (stack.length > 1) closeGroup();
  return top.sum + top.last;
}

/** What RE2 objected to, said for someone who wrote a JavaScript or PCRE pattern. */
function explainSyntaxError(error: RE2JSSyntaxException): string {
  const fragment = error.input ?? "";
  const code = error.error;
  if (code === "invalid or unsupported Perl syntax" && /^\(\?[=!]/.test(fragment)) {
    return "lookahead ((?=…) and (?!…)) is not supported";
  }
  if (code === "invalid named capture" && /^\(\?<[=!]/.test(fragment)) {
    return "lookbehind ((?<=…) and (?<!…)) is not supported";
  }
  if (code === "invalid escape sequence") {
    if (/^\\[1-9]/.test(fragment)) return `backreferences such as ${fragment} are not supported`;
    if (fragment.startsWith("\\k")) return "named backreferences (\\k<name>) are not supported";
    if (fragment.startsWith("\\u")) return "write a code point as \\x{00E9}, not \\u00E9";
  }
  if (code === "invalid nested repetition operator" && /^[*+?}]\+$/.test(fragment)) {
    return `possessive quantifiers (such as x${fragment}) are not supported`;
  }
  if (code === "invalid repeat count") {
    return `the repeat count ${fragment} is too large: counts, multiplied when nested, are limited to 1000`;
  }
  return fragment ? `${code}: ${fragment}` : code;
}

function refuse(source: string, reason: string): never {
  throw new PatternError(source, `${reason}. ${RE2_SYNTAX_NOTE}.`);
}

const CACHE_LIMIT = 1000;
const compiled = new Map<string, UserPattern>();

/**
 * Compiles a member's pattern for linear-time matching, or throws a PatternError saying what to change.
 * Compiled patterns are cached by flags and source.
 */
export function compileUserPattern(source: string, flags = ""): UserPattern {
  if (typeof source !== "string") throw new PatternError(String(source), "a pattern must be a string");
  const key = `${flags}/${source}`;
  const cached = compiled.get(key);
  if (cached) return cached;
  if (source.length > MAX_PATTERN_LENGTH) {
    throw new PatternError(
      source,
      `the pattern is ${source.length} characters long; patterns are limited to ${MAX_PATTERN_LENGTH}`,
    );
  }
  let bits = 0;
  for (const flag of new Set(flags)) {
    const bit = FLAG_BITS[flag];
    if (bit === undefined) {
      refuse(source, `the flag "${flag}" is not supported (use g, i, m or s)`);
    }
    bits |= bit;
  }
  const tooLarge = (size: number): never => {
    throw new PatternError(
      source,
      `the pattern expands to about ${size} steps once its repetitions are written out, more than the ${MAX_PROGRAM_SIZE} allowed; use smaller counts in {n,m}, or + and *`,
    );
  };
  const estimate = estimatedProgramSize(source);
  if (estimate > MAX_PROGRAM_SIZE) tooLarge(estimate);
  let re: RE2JS;
  try {
    re = RE2JS.compile(source, bits);
  } catch (error) {
    if (error instanceof RE2JSSyntaxException) refuse(source, explainSyntaxError(error));
    if (error instanceof RE2JSException) refuse(source, error.message);
    throw error;
  }
  if (re.programSize() > MAX_PROGRAM_SIZE) tooLarge(re.programSize());
  const pattern = new UserPattern(source, [...new Set(flags)].join(""), re);
  if (compiled.size >= CACHE_LIMIT) compiled.clear();
  compiled.set(key, pattern);
  return pattern;
}

/** Null when the pattern is usable, else why not (for validation messages). */
export function patternProblem(source: string, flags = ""): string | null {
  try {
    compileUserPattern(source, flags);
    return null;
  } catch (error) {
    if (error instanceof PatternError) return error.reason;
    throw error;
  }
}
