/** nunjucks' compiler, parser and runtime: public exports without type declarations, typed here once. */
import { createRequire } from "node:module";
import nunjucks from "nunjucks";

export type Callback = (err: unknown, result?: string) => void;
export type RootFn = (env: unknown, context: unknown, frame: unknown, runtime: unknown, cb: Callback) => void;
export type TemplateProps = { root: RootFn; [block: string]: unknown };
export type AstNode = { lineno: number; val?: { typename: string; value?: unknown }; value?: unknown };
export type Ast = { findAll(type: unknown): AstNode[] };
export type Internals = {
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
export const internals = nunjucks as unknown as Internals;
// The step between parsing and code generation (lifting `super()` in blocks), not exported by nunjucks'
// entry point; compiling from the checked syntax tree instead of the source needs it.
export const transformer = createRequire(import.meta.url)("nunjucks/src/transformer") as {
  transform(ast: Ast, asyncFilters: string[]): unknown;
};
export const { SafeString } = internals.runtime;
export type Safe = InstanceType<typeof SafeString>;

/** An error with the 1-based template line it happened on, when known. */
export type Located = Error & { lineno?: number };
