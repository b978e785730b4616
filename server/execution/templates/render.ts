/**
 * Renders a code's input files and command-line arguments from its nunjucks templates: parameter values
 * escaped per file format (escaping.ts) and printed per format (printing.ts), templates compiled from a
 * checked syntax tree and run in a restricted runtime under a time limit (sandbox.ts).
 */
import { createHash } from "node:crypto";
import type { CodeDefinition, TemplateFormat } from "../../../shared/schemas/codes";
import type { TargetTemplateContext } from "../../../shared/schemas/targets";
import { compileUserPattern, PatternError } from "../user-patterns";
import { type Escaped, escapeValue, LONE_SURROGATE } from "./escaping";
import {
  type Ast,
  internals,
  type Located,
  type RootFn,
  type TemplateProps,
  transformer,
} from "./nunjucks-internals";
import { ENV_OPTIONS, env, FORBIDDEN_NAMES, RUNTIMES, withRenderDeadline } from "./sandbox";

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

const COMPILED_CACHE_LIMIT = 500;
const compiledCache = new Map<string, TemplateProps>();
/** The first line of each compiled template that names `target` (the run's target), or null. */
const targetLines = new WeakMap<TemplateProps, number | null>();

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
  let targetLine: number | null = null;
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
    const symbolNode = (internals.nodes as Record<string, unknown>).Symbol;
    const targetSymbol = ast.findAll(symbolNode).find((node) => node.value === "target");
    targetLine = targetSymbol ? targetSymbol.lineno + 1 : null;
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
  targetLines.set(props, targetLine);
  return props;
}

function renderTemplate(
  source: string,
  fileName: string,
  format: TemplateFormat,
  context: Record<string, Escaped>,
): string {
  const props = compileTemplate(source, fileName);
  const targetLine = targetLines.get(props) ?? null;
  // Without this check a template would loop over no atoms and write an input with no molecule in it.
  if (targetLine !== null && context.target === undefined) {
    throw new TemplateError(
      fileName,
      targetLine,
      "the template reads `target`, but the run names no target; choose a target for the run",
    );
  }
  const runtime = RUNTIMES[format];
  let failure: Located | null = null;
  const root: RootFn = (e, ctx, frame, _runtime, cb) =>
    props.root(e, ctx, frame, runtime, (err, result) => {
      if (err) failure = err as Located;
      cb(err, result);
    });
  let output: string;
  try {
    output = withRenderDeadline(() =>
      new internals.Template({ type: "code", obj: { ...props, root } }, env, fileName).render(context),
    );
  } catch (error) {
    const cause: Located = failure ?? (error as Located);
    throw new TemplateError(fileName, cause.lineno ?? null, cleanReason(cause));
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

/**
 * The stage's parameters and the run's target (when it has one) escaped for the file's format. The target
 * goes through the same escaping as parameters: its name and labels are text a member entered.
 */
function escapedContext(
  parameters: Record<string, unknown>,
  target: TargetTemplateContext | null,
  format: TemplateFormat,
  fileName: string,
): Record<string, Escaped> {
  if (Object.hasOwn(parameters, "target")) {
    throw new TemplateError(
      fileName,
      null,
      'a parameter may not be named "target": templates read the run\'s target under that name',
    );
  }
  let escaped: Record<string, Escaped>;
  try {
    escaped = escapeValue(parameters, format, "parameters") as Record<string, Escaped>;
  } catch (error) {
    throw new TemplateError(fileName, null, (error as Error).message.replace(/^parameters\./, "parameter "));
  }
  if (target) {
    try {
      escaped.target = escapeValue(target, format, "target");
    } catch (error) {
      throw new TemplateError(fileName, null, (error as Error).message);
    }
  }
  return escaped;
}

export const argumentLabel = (index: number) => `argument ${index + 1}`;

/**
 * Renders every input file and every argument, with the stage's parameters and the run's `target` (null
 * for a run without one). An argument that renders to an empty string is left out, so
 * `{% if verbose %}--verbose{% endif %}` adds a flag only when asked for.
 */
export function renderCodeFiles(
  definition: CodeDefinition,
  parameters: Record<string, unknown>,
  target: TargetTemplateContext | null = null,
): RenderedCode {
  const files = definition.inputTemplates.map((input) => ({
    fileName: input.fileName,
    content: renderTemplate(
      input.template,
      input.fileName,
      input.format,
      escapedContext(parameters, target, input.format, input.fileName),
    ),
  }));
  const argv: string[] = [];
  definition.arguments.forEach((template, index) => {
    const label = argumentLabel(index);
    const value = renderTemplate(template, label, "text", escapedContext(parameters, target, "text", label));
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
