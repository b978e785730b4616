/**
 * The restricted runtime templates render in, and the nunjucks environment it belongs to.
 *
 * Templates are written by group members and run inside the server, and nunjucks does not sandbox
 * them (a template can reach `"".constructor.constructor`, i.e. Function). Rendering therefore runs the
 * compiled template with a restricted runtime: names resolve only to own properties of the context,
 * member access is limited to own data properties and a list of harmless string/array/number methods,
 * and no template can load another one (include/import/extends are refused).
 *
 * Nothing a template does may hold the event loop past the render time limit, and a single call into a
 * backtracking RegExp cannot be interrupted. So regex literals (`r/…/`) are compiled into RE2 patterns
 * (user-patterns.ts) instead of RegExp, the `replace` filter matches with those (`split` refuses
 * them), and the built-in filters whose own regular expressions backtrack on long values (`trim`, `striptags`) are
 * replaced by linear versions. nunjucks finds the end of a `{% raw %}` block by retrying a regex from
 * every position, quadratic when the end tag is missing, so such a template is refused before parsing
 * (render.ts).
 */
import nunjucks from "nunjucks";
import type { TemplateFormat } from "../../../shared/schemas/codes";
import { compileUserPattern, UserPattern } from "../user-patterns";
import { internals, type Located, type Safe, SafeString } from "./nunjucks-internals";
import { isPlainObject, printValue } from "./printing";

/**
 * Longest one template may render. A loop nest can be slow without printing anything; the runtime
 * checks the clock on every name and member lookup and at the start of every loop, so even an empty
 * innermost loop (at most MAX_RANGE_LENGTH turns) overruns by milliseconds only.
 */
export const RENDER_TIME_LIMIT_MS = 2000;
/** `range()` larger than this is refused for the same reason. */
const MAX_RANGE_LENGTH = 100_000;
export const FORBIDDEN_NAMES = new Set(["constructor", "__proto__", "prototype"]);
const STRING_METHODS = new Set([
  "toUpperCase",
  "toLowerCase",
  "trim",
  "trimStart",
  "trimEnd",
  "startsWith",
  "endsWith",
  "includes",
  "indexOf",
  "lastIndexOf",
  "slice",
  "substring",
  "split",
  "charAt",
  "at",
]);
const ARRAY_METHODS = new Set(["join", "slice", "indexOf", "includes", "at"]);
const NUMBER_METHODS = new Set(["toFixed", "toPrecision", "toExponential"]);

export const ENV_OPTIONS = { autoescape: false, throwOnUndefined: true };
const refusingLoader: nunjucks.ILoader = {
  getSource(name: string): nunjucks.LoaderSource {
    throw new Error(`templates cannot load other templates ("${name}"); put everything in this template`);
  },
};
export const env = new nunjucks.Environment(refusingLoader, ENV_OPTIONS);
env.addGlobal("range", (start: number, stop?: number, step = 1) => {
  const [from, to] = stop === undefined ? [0, start] : [start, stop];
  if (!step) throw new Error("range() needs a step other than 0");
  if (Math.abs((to - from) / step) > MAX_RANGE_LENGTH) {
    throw new Error(`range() is limited to ${MAX_RANGE_LENGTH} values`);
  }
  const values: number[] = [];
  for (let i = from; step > 0 ? i < to : i > to; i += step) values.push(i);
  return values;
});
env.addFilter("dump", () => {
  throw new Error(
    "dump is not available: print the value itself, it is already written for the file's format",
  );
});

// Filters that would run a backtracking RegExp: routed to RE2 or to linear string methods.

const isText = (value: unknown): value is string | Safe =>
  typeof value === "string" || value instanceof SafeString;
const builtinReplace = env.getFilter("replace");
env.addFilter(
  "replace",
  function (this: unknown, text: unknown, old: unknown, replacement: unknown, maxCount) {
    if (!(old instanceof UserPattern)) return builtinReplace.call(this, text, old, replacement, maxCount);
    if (typeof replacement === "function")
      throw new Error("replace with a pattern takes text as the replacement");
    if (!isText(text) && typeof text !== "number") return text;
    checkDeadline();
    return internals.runtime.copySafeness(text, old.replace(String(text), String(replacement)));
  },
);
const builtinTrim = env.getFilter("trim");
// nunjucks trims with /^\s*|\s*$/g, quadratic in a run of spaces; String#trim removes the same characters.
env.addFilter("trim", (text: unknown) =>
  isText(text) ? internals.runtime.copySafeness(text, String(text).trim()) : builtinTrim(text),
);
const HTML_TAG = compileUserPattern(String.raw`<\/?([a-z][a-z0-9]*)\b[^>]*>|<!--[\s\S]*?-->`, "gi");
const LINE_EDGE_SPACES = compileUserPattern("^ +| +$", "gm");
const builtinStriptags = env.getFilter("striptags");
// The same steps as nunjucks' striptags; the two patterns that backtrack on long input run on RE2.
env.addFilter("striptags", (input: unknown, preserveLinebreaks?: boolean) => {
  if (!isText(input)) return builtinStriptags(input, preserveLinebreaks);
  checkDeadline();
  const text = HTML_TAG.replace(String(input), "").trim();
  const stripped = preserveLinebreaks
    ? LINE_EDGE_SPACES.replace(text, "")
        .replace(/ +/g, " ")
        .replaceAll("\r\n", "\n")
        .replace(/\n\n\n+/g, "\n\n")
    : text.replace(/\s+/g, " ");
  return internals.runtime.copySafeness(input, stripped);
});

const hasOwn = (target: object, key: string): boolean => Object.hasOwn(target, key);

/** Set for the duration of one (synchronous) render; every runtime hook checks it. */
let renderDeadline = Number.POSITIVE_INFINITY;

/** Runs one synchronous render under the time limit. */
export function withRenderDeadline<T>(render: () => T): T {
  renderDeadline = Date.now() + RENDER_TIME_LIMIT_MS;
  try {
    return render();
  } finally {
    renderDeadline = Number.POSITIVE_INFINITY;
  }
}

function checkDeadline(): void {
  if (Date.now() > renderDeadline) {
    throw new Error(`rendering took longer than ${RENDER_TIME_LIMIT_MS} ms; is a loop far too large?`);
  }
}

function bound(target: unknown, fn: unknown): (...args: unknown[]) => unknown {
  return (...args) => (fn as (...a: unknown[]) => unknown).apply(target, args);
}

function safeMemberLookup(target: unknown, key: unknown): unknown {
  checkDeadline();
  if (target === undefined || target === null) return undefined;
  const name = String(key);
  if (FORBIDDEN_NAMES.has(name)) throw new Error(`templates cannot read "${name}"`);
  if (typeof target === "string" || target instanceof SafeString) {
    const text = target.toString();
    if (name === "length") return text.length;
    if (STRING_METHODS.has(name)) return bound(text, (String.prototype as never)[name]);
    if (/^\d+$/.test(name)) return text[Number(name)];
    return undefined;
  }
  if (typeof target === "number") {
    return NUMBER_METHODS.has(name) ? bound(target, (Number.prototype as never)[name]) : undefined;
  }
  if (Array.isArray(target)) {
    if (name === "length" || /^\d+$/.test(name)) return target[name as never];
    return ARRAY_METHODS.has(name) ? bound(target, (Array.prototype as never)[name]) : undefined;
  }
  if (typeof target === "object" && isPlainObject(target) && hasOwn(target, name)) {
    const value = (target as Record<string, unknown>)[name];
    // Functions found here were put there by nunjucks itself (cycler(), loop helpers, macros).
    return typeof value === "function" ? bound(target, value) : value;
  }
  return undefined;
}

type LookupContext = { ctx: Record<string, unknown>; env: { globals: Record<string, unknown> } };
type LookupFrame = { lookup(name: string): unknown };

function safeContextLookup(context: LookupContext, frame: LookupFrame, name: string): unknown {
  checkDeadline();
  const local = frame.lookup(name);
  if (local !== undefined) return local;
  if (hasOwn(context.ctx, name)) return context.ctx[name];
  if (hasOwn(context.env.globals, name)) return context.env.globals[name];
  return undefined;
}

function runtimeFor(format: TemplateFormat) {
  return {
    ...internals.runtime,
    memberLookup: safeMemberLookup,
    contextOrFrameLookup: safeContextLookup,
    // Regex literals compile to calls of this (see compileTemplate), never to a RegExp.
    userPattern: (source: string, flags: string) => compileUserPattern(source, flags),
    suppressValue: (value: unknown) => {
      checkDeadline();
      return printValue(value, format);
    },
    fromIterator: (value: unknown) => {
      checkDeadline();
      return internals.runtime.fromIterator(value);
    },
    // nunjucks passes 0-based positions here (ensureDefined's errors already carry 1-based ones).
    handleError(error: Located, lineno: number) {
      if (error?.lineno) return error;
      const located: Located = error instanceof Error ? error : new Error(String(error));
      located.lineno = lineno + 1;
      return located;
    },
  };
}
export const RUNTIMES = {
  text: runtimeFor("text"),
  shell: runtimeFor("shell"),
  json: runtimeFor("json"),
  namelist: runtimeFor("namelist"),
} as const;
