/**
 * Renders a code's input files and command-line arguments from its nunjucks templates.
 *
 * Parameter values come from whoever submits a run, so every string is escaped for the file's format
 * before the template sees it (autoescape stays off; each escaped leaf is marked safe):
 *   shell    → POSIX single-quoted word ('it'\''s')
 *   json     → JSON string literal
 *   namelist → Fortran character constant with doubled quotes ('it''s'); booleans print .true./.false.
 *   text     → as given, but control characters (newlines included) are refused
 * Numbers and booleans stay native so conditions and arithmetic work; they are printed per format.
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
 * every position, quadratic when the end tag is missing, so such a template is refused before parsing.
 */
import { createHash } from "node:crypto";
import { createRequire } from "node:module";
import nunjucks from "nunjucks";
import type { CodeDefinition, TemplateFormat } from "../../shared/schemas/codes";
import { compileUserPattern, PatternError, UserPattern } from "./user-patterns";

export class TemplateError extends Error {
  constructor(
    readonly fileName: string,
    readonly line: number | null,
    readonly reason: string,
  ) {
    super(`${fileName}${line ? `, line ${line}` : ""}: ${reason}`);
    this.name = "TemplateError";
  }
}

export type RenderedCode = { files: { fileName: string; content: string }[]; argv: string[] };

/** Cap on one rendered file, so a runaway loop fails clearly instead of exhausting memory later. */
const MAX_RENDERED_CHARS = 10 * 1024 * 1024;
/**
 * Longest one template may render. A loop nest can be slow without printing anything; the runtime
 * checks the clock on every name and member lookup and at the start of every loop, so even an empty
 * innermost loop (at most MAX_RANGE_LENGTH turns) overruns by milliseconds only.
 */
export const RENDER_TIME_LIMIT_MS = 2000;
/** `range()` larger than this is refused for the same reason. */
const MAX_RANGE_LENGTH = 100_000;
const FORBIDDEN_NAMES = new Set(["constructor", "__proto__", "prototype"]);
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
// biome-ignore lint/suspicious/noControlCharactersInRegex: matching control characters is the point.
const CONTROL_CHARACTERS = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/;
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

// nunjucks' compiler, parser and runtime are public exports without type declarations.
type Callback = (err: unknown, result?: string) => void;
type RootFn = (env: unknown, context: unknown, frame: unknown, runtime: unknown, cb: Callback) => void;
type TemplateProps = { root: RootFn; [block: string]: unknown };
type AstNode = { lineno: number; val?: { typename: string; value?: unknown }; value?: unknown };
type Ast = { findAll(type: unknown): AstNode[] };
type Internals = {
  compiler: {
    Compiler: new (
      name: string,
      throwOnUndefined: boolean,
    ) => { compile(ast: unknown): void; getCode(): string };
  };
  parser: { parse(src: string, exts: unknown[], opts: object): Ast };
  nodes: Record<"Include" | "Import" | "FromImport" | "Extends" | "LookupVal" | "Literal", unknown>;
  runtime: Record<string, unknown> & {
    SafeString: typeof nunjucks.runtime.SafeString;
    fromIterator(value: unknown): unknown;
    copySafeness(original: unknown, result: string): unknown;
  };
  Template: new (
    src: { type: "code"; obj: TemplateProps },
    env: nunjucks.Environment,
    path: string,
  ) => {
    render(context: object): string;
  };
};
const internals = nunjucks as unknown as Internals;
// The step between parsing and code generation (lifting `super()` in blocks), not exported by nunjucks'
// entry point; compiling from the checked syntax tree instead of the source needs it.
const transformer = createRequire(import.meta.url)("nunjucks/src/transformer") as {
  transform(ast: Ast, asyncFilters: string[]): unknown;
};
const { SafeString } = internals.runtime;
type Safe = InstanceType<typeof SafeString>;

const ENV_OPTIONS = { autoescape: false, throwOnUndefined: true };
const refusingLoader: nunjucks.ILoader = {
  getSource(name: string): nunjucks.LoaderSource {
    throw new Error(`templates cannot load other templates ("${name}"); put everything in this template`);
  },
};
const env = new nunjucks.Environment(refusingLoader, ENV_OPTIONS);
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

// ---------------------------------------------------------------------------------------------------
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

// ---------------------------------------------------------------------------------------------------
// Escaping of parameter values, per format.

type Escaped = Safe | number | boolean | Escaped[] | { [key: string]: Escaped };

function quoteString(value: string, format: TemplateFormat, where: string): string {
  if (LONE_SURROGATE.test(value)) {
    throw new Error(`${where} contains a lone UTF-16 surrogate, which cannot be written as UTF-8`);
  }
  switch (format) {
    case "shell":
      if (value.includes("\0"))
        throw new Error(`${where} contains a NUL character, which a shell cannot pass`);
      return `'${value.replaceAll("'", "'\\''")}'`;
    case "json":
      return JSON.stringify(value);
    case "namelist":
      if (CONTROL_CHARACTERS.test(value)) {
        throw new Error(
          `${where} contains a control character (such as a newline); namelist strings are one line`,
        );
      }
      return `'${value.replaceAll("'", "''")}'`;
    case "text":
      if (CONTROL_CHARACTERS.test(value)) {
        throw new Error(`${where} contains a control character (such as a newline), which text files refuse`);
      }
      return value;
  }
}

function escapeValue(value: unknown, format: TemplateFormat, where: string): Escaped {
  if (typeof value === "string") return new SafeString(quoteString(value, format, where));
  if (typeof value === "number") {
    if (!Number.isFinite(value)) throw new Error(`${where} is not a finite number`);
    return value;
  }
  if (typeof value === "boolean") return value;
  if (value === null) {
    if (format === "namelist") throw new Error(`${where} is null, which a namelist cannot express`);
    return new SafeString(format === "json" ? "null" : format === "shell" ? "''" : "");
  }
  if (Array.isArray(value)) return value.map((item, i) => escapeValue(item, format, `${where}[${i}]`));
  if (typeof value === "object") {
    // A null prototype: nothing is inherited, and a key named "__proto__" stays an ordinary key.
    const escaped: { [key: string]: Escaped } = Object.create(null);
    for (const [key, item] of Object.entries(value)) {
      if (key === "__proto__") throw new Error(`${where} has a key named __proto__, which is not allowed`);
      escaped[key] = escapeValue(item, format, `${where}.${key}`);
    }
    return escaped;
  }
  throw new Error(`${where} has a value of type ${typeof value}, which cannot be written to a file`);
}

// ---------------------------------------------------------------------------------------------------
// Printing: what `{{ value }}` writes. Template strings print as they are; parameter strings are
// already escaped; containers print as the format's list or object notation.

const isPlainObject = (value: object): boolean => {
  const proto = Object.getPrototypeOf(value);
  return proto === Object.prototype || proto === null;
};

function printScalar(value: unknown, format: TemplateFormat, inContainer: boolean): string {
  if (value instanceof SafeString) return value.toString();
  if (typeof value === "string") return inContainer ? quoteString(value, format, "a value") : value;
  if (typeof value === "boolean")
    return format === "namelist" ? (value ? ".true." : ".false.") : String(value);
  if (typeof value === "number") {
    if (format === "json" && !Number.isFinite(value)) throw new Error(`${value} cannot be written as JSON`);
    return String(value);
  }
  if (value === null || value === undefined) return format === "json" && inContainer ? "null" : "";
  if (typeof value === "function") throw new Error("a function cannot be printed; call it");
  if (typeof value === "object") return printValue(value, format);
  return String(value);
}

function printValue(value: unknown, format: TemplateFormat): string {
  if (Array.isArray(value)) {
    const items = value.map((item) => printScalar(item, format, true));
    if (format === "json") return `[${items.join(", ")}]`;
    return items.join(format === "shell" ? " " : ", ");
  }
  if (typeof value === "object" && value !== null && !(value instanceof SafeString)) {
    if (!isPlainObject(value)) throw new Error("this value cannot be printed");
    if (format !== "json") {
      throw new Error(`an object cannot be printed into a ${format} file; print its fields one by one`);
    }
    const entries = Object.entries(value).map(
      ([key, item]) => `${JSON.stringify(key)}: ${printScalar(item, format, true)}`,
    );
    return `{${entries.join(", ")}}`;
  }
  return printScalar(value, format, false);
}

// ---------------------------------------------------------------------------------------------------
// The restricted runtime.

const hasOwn = (target: object, key: string): boolean => Object.hasOwn(target, key);

/** Set for the duration of one (synchronous) render; every runtime hook checks it. */
let renderDeadline = Number.POSITIVE_INFINITY;

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

type Located = Error & { lineno?: number };

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
const RUNTIMES = {
  text: runtimeFor("text"),
  shell: runtimeFor("shell"),
  json: runtimeFor("json"),
  namelist: runtimeFor("namelist"),
} as const;

// ---------------------------------------------------------------------------------------------------
// Compiling and rendering.

const COMPILED_CACHE_LIMIT = 500;
const compiledCache = new Map<string, TemplateProps>();

function cleanReason(error: unknown): string {
  const message = error instanceof Error ? error.message : String(error);
  const reason = message
    .replace(/^\([^)]*\)(\s*\[Line \d+, Column \d+\])?\s*/, "")
    .replace(/^(Template render error:\s*)+/i, "")
    .replace(/^Error:\s*/, "")
    .trim();
  return reason === "attempted to output null or undefined value"
    ? "prints a value that is not defined (a parameter that was not given? test it with `is defined`)"
    : reason;
}

/** Raw blocks one template may hold: nunjucks copies the rest of the template for each one it reads. */
const MAX_RAW_BLOCKS = 100;

/**
 * Refuses a `{% raw %}` or `{% verbatim %}` block that is never closed. nunjucks looks for the end with
 * an unanchored lazy regex; when there is none it retries from every position, quadratic in the rest
 * of the template. Inside a block it counts only `{% raw %}` and `{% endraw %}` without `-`, as here.
 */
function checkRawBlocks(source: string, fileName: string): void {
  const tags = /\{%(-?)\s*(end)?(raw|verbatim)\s*(-?)%\}/g;
  const lineOf = (index: number) => source.slice(0, index).split("\n").length;
  let open: { name: string; index: number; depth: number } | null = null;
  let blocks = 0;
  for (const tag of source.matchAll(tags)) {
    const [, dashBefore, end, name] = tag;
    const plain = !dashBefore && !tag[4];
    if (!open) {
      if (end) continue;
      open = { name: name!, index: tag.index, depth: 1 };
      blocks += 1;
      if (blocks > MAX_RAW_BLOCKS) {
        throw new TemplateError(
          fileName,
          lineOf(tag.index),
          `a template may hold at most ${MAX_RAW_BLOCKS} {% raw %} or {% verbatim %} blocks; merge them`,
        );
      }
    } else if (plain && name === open.name) {
      open.depth += end ? -1 : 1;
      if (open.depth === 0) open = null;
    }
  }
  if (open) {
    throw new TemplateError(
      fileName,
      lineOf(open.index),
      `{% ${open.name} %} is never closed; end it with {% end${open.name} %} (written without "-")`,
    );
  }
}

/**
 * Compiles each regex literal to a call of the runtime's `userPattern` (RE2). compileLiteral prints a
 * non-string literal with `toString()`, so the literal's value becomes that call's source text.
 */
function routeRegexLiterals(ast: Ast, fileName: string): void {
  for (const literal of ast.findAll(internals.nodes.Literal)) {
    if (!(literal.value instanceof RegExp)) continue;
    const { source, flags } = literal.value;
    try {
      compileUserPattern(source, flags);
    } catch (error) {
      if (!(error instanceof PatternError)) throw error;
      throw new TemplateError(
        fileName,
        literal.lineno + 1,
        `the pattern r/${source}/${flags}: ${error.reason}`,
      );
    }
    const call = `runtime.userPattern(${JSON.stringify(source)}, ${JSON.stringify(flags)})`;
    literal.value = { toString: () => call };
  }
}

/** Parses and compiles a template, refusing anything that would load another template. */
function compileTemplate(source: string, fileName: string): TemplateProps {
  const cacheKey = createHash("sha256").update(fileName).update("\0").update(source).digest("hex");
  const cached = compiledCache.get(cacheKey);
  if (cached) return cached;
  let props: TemplateProps;
  try {
    checkRawBlocks(source, fileName);
    const ast = internals.parser.parse(source, [], ENV_OPTIONS);
    for (const type of ["Include", "Import", "FromImport", "Extends"] as const) {
      const found = ast.findAll(internals.nodes[type])[0];
      if (found) {
        throw new TemplateError(
          fileName,
          found.lineno + 1,
          "templates cannot include, import or extend other templates; put everything in this template",
        );
      }
    }
    for (const lookup of ast.findAll(internals.nodes.LookupVal)) {
      const key = lookup.val?.typename === "Literal" ? String(lookup.val.value) : null;
      if (key && FORBIDDEN_NAMES.has(key)) {
        throw new TemplateError(fileName, lookup.lineno + 1, `templates cannot read "${key}"`);
      }
    }
    routeRegexLiterals(ast, fileName);
    const compiler = new internals.compiler.Compiler(fileName, ENV_OPTIONS.throwOnUndefined);
    compiler.compile(transformer.transform(ast, []));
    props = new Function(compiler.getCode())() as TemplateProps;
  } catch (error) {
    if (error instanceof TemplateError) throw error;
    const reason = cleanReason(error);
    // The parser gives no position only when the text ends inside a tag: it stopped at the end of the file.
    const atEnd = (error as Located).lineno === undefined;
    throw new TemplateError(
      fileName,
      (error as Located).lineno ?? (atEnd ? source.split("\n").length : null),
      atEnd ? `${reason} at the end of the file (is a tag left open?)` : reason,
    );
  }
  if (compiledCache.size >= COMPILED_CACHE_LIMIT) compiledCache.clear();
  compiledCache.set(cacheKey, props);
  return props;
}

function renderTemplate(
  source: string,
  fileName: string,
  format: TemplateFormat,
  context: Record<string, Escaped>,
): string {
  const props = compileTemplate(source, fileName);
  const runtime = RUNTIMES[format];
  let failure: Located | null = null;
  const root: RootFn = (e, ctx, frame, _runtime, cb) =>
    props.root(e, ctx, frame, runtime, (err, result) => {
      if (err) failure = err as Located;
      cb(err, result);
    });
  let output: string;
  renderDeadline = Date.now() + RENDER_TIME_LIMIT_MS;
  try {
    output = new internals.Template({ type: "code", obj: { ...props, root } }, env, fileName).render(context);
  } catch (error) {
    const cause: Located = failure ?? (error as Located);
    throw new TemplateError(fileName, cause.lineno ?? null, cleanReason(cause));
  } finally {
    renderDeadline = Number.POSITIVE_INFINITY;
  }
  if (output.length > MAX_RENDERED_CHARS) {
    throw new TemplateError(
      fileName,
      null,
      `the rendered file is larger than ${MAX_RENDERED_CHARS} characters`,
    );
  }
  if (LONE_SURROGATE.test(output)) {
    throw new TemplateError(fileName, null, "the rendered text contains a lone UTF-16 surrogate");
  }
  return output;
}

function escapedContext(
  parameters: Record<string, unknown>,
  format: TemplateFormat,
  fileName: string,
): Record<string, Escaped> {
  try {
    const escaped = escapeValue(parameters, format, "parameters");
    return escaped as Record<string, Escaped>;
  } catch (error) {
    throw new TemplateError(fileName, null, (error as Error).message.replace(/^parameters\./, "parameter "));
  }
}

export const argumentLabel = (index: number) => `argument ${index + 1}`;

/**
 * Renders every input file and every argument. An argument that renders to an empty string is left
 * out, so `{% if verbose %}--verbose{% endif %}` adds a flag only when asked for.
 */
export function renderCodeFiles(
  definition: CodeDefinition,
  parameters: Record<string, unknown>,
): RenderedCode {
  const files = definition.inputTemplates.map((input) => ({
    fileName: input.fileName,
    content: renderTemplate(
      input.template,
      input.fileName,
      input.format,
      escapedContext(parameters, input.format, input.fileName),
    ),
  }));
  const argv: string[] = [];
  definition.arguments.forEach((template, index) => {
    const label = argumentLabel(index);
    const value = renderTemplate(template, label, "text", escapedContext(parameters, "text", label));
    if (value !== "") argv.push(value);
  });
  return { files, argv };
}

/** Compiles every template of a definition without rendering; returns one problem per broken template. */
export function checkCodeTemplates(
  definition: Pick<CodeDefinition, "inputTemplates" | "arguments">,
): { path: string; message: string }[] {
  const problems: { path: string; message: string }[] = [];
  definition.inputTemplates.forEach((input, index) => {
    try {
      compileTemplate(input.template, input.fileName);
    } catch (error) {
      problems.push({ path: `inputTemplates.${index}.template`, message: (error as Error).message });
    }
  });
  definition.arguments.forEach((template, index) => {
    try {
      compileTemplate(template, argumentLabel(index));
    } catch (error) {
      problems.push({ path: `arguments.${index}`, message: (error as Error).message });
    }
  });
  return problems;
}
