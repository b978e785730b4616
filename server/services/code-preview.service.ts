/**
 * The preview of a code's input files: the same parameter check (the code's JSON Schema, defaults filled
 * in), the same target context and the same renderer (under its time and size limits) a run's plan uses,
 * for one code alone. It only reads: nothing is written and no audit entry is made.
 */
import {
  CODE_PREVIEW_FILE_CHARS,
  type CodeDefinition,
  type CodePreview,
  type CodePreviewRequest,
  codeDefinitionSchema,
} from "../../shared/schemas/codes";
import type { TargetTemplateContext } from "../../shared/schemas/targets";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { validateParameters } from "../execution/parameters";
import { targetTemplateContext } from "../execution/target-context";
import { type RenderedCode, renderCodeFiles } from "../execution/templates/render";
import { RENDER_TIME_LIMIT_MS } from "../execution/templates/sandbox";
import { AppError } from "../http/errors";
import { codeForCaller } from "./codes.service";
import { loadRunTarget } from "./targets.service";

/**
 * Longest a whole preview may spend rendering. Each template already stops at RENDER_TIME_LIMIT_MS, but a
 * code has up to 20 templates and 50 arguments, and rendering holds the server's event loop; so the
 * preview renders one template at a time and stops once this much time has gone, which bounds a request
 * to about this plus one template's limit.
 */
export const PREVIEW_RENDER_BUDGET_MS = 2 * RENDER_TIME_LIMIT_MS;

/**
 * The same rendering as a run's plan (renderCodeFiles, per template, with the same escaping, context and
 * limits), one template at a time under PREVIEW_RENDER_BUDGET_MS.
 */
export function renderWithinBudget(
  definition: CodeDefinition,
  parameters: Record<string, unknown>,
  target: TargetTemplateContext | null,
  now: () => number = Date.now,
): RenderedCode {
  const started = now();
  const overBudget = (what: string) => {
    if (now() - started <= PREVIEW_RENDER_BUDGET_MS) return;
    throw new AppError(
      422,
      "template_failed",
      `Rendering this code's templates took longer than ${PREVIEW_RENDER_BUDGET_MS} ms in all (stopped before ${what}); shorten its loops.`,
    );
  };
  const files: RenderedCode["files"] = [];
  try {
    for (const input of definition.inputTemplates) {
      overBudget(input.fileName);
      files.push(
        ...renderCodeFiles({ ...definition, inputTemplates: [input], arguments: [] }, parameters, target)
          .files,
      );
    }
    overBudget("the arguments");
    const { argv } = renderCodeFiles({ ...definition, inputTemplates: [] }, parameters, target);
    return { files, argv };
  } catch (error) {
    if (error instanceof AppError) throw error;
    throw new AppError(422, "template_failed", (error as Error).message);
  }
}

function previewText(content: string) {
  const sizeBytes = Buffer.byteLength(content, "utf8");
  const truncated = content.length > CODE_PREVIEW_FILE_CHARS;
  return { sizeBytes, text: truncated ? content.slice(0, CODE_PREVIEW_FILE_CHARS) : content, truncated };
}

export async function previewCode(
  db: Database,
  principal: Principal,
  codeId: string,
  request: Required<CodePreviewRequest>,
): Promise<CodePreview> {
  const { row } = await codeForCaller(db, principal, codeId);
  const definition = codeDefinitionSchema.parse(row.definition);

  const checked = validateParameters(definition, request.parameters);
  if (!checked.valid) {
    const details = checked.errors.map((error) => ({
      path: error.path ? `parameters.${error.path}` : "parameters",
      message: error.message,
    }));
    const first = details[0]!;
    throw new AppError(
      422,
      "invalid_parameters",
      `The parameters do not fit ${definition.name} ${definition.version}: ${first.path} ${first.message}.`,
      details,
    );
  }

  let target: Awaited<ReturnType<typeof loadRunTarget>> | null = null;
  if (request.targetId) {
    try {
      target = await loadRunTarget(db, row.groupId, request.targetId);
    } catch (error) {
      if (!(error instanceof AppError) || error.status !== 422) throw error;
      throw new AppError(422, "validation_failed", "The target does not exist in this group.", [
        { path: "targetId", message: "Unknown target." },
      ]);
    }
  }

  const rendered = renderWithinBudget(
    definition,
    checked.parameters,
    target ? targetTemplateContext(target) : null,
  );
  return {
    parameters: checked.parameters,
    target: target
      ? { id: target.target.id, name: target.target.name, version: target.version.version }
      : null,
    files: rendered.files.map((file) => ({ fileName: file.fileName, ...previewText(file.content) })),
    arguments: rendered.argv,
  };
}
