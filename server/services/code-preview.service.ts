/**
 * The preview of a code's input files: the same parameter check (the code's JSON Schema, defaults filled
 * in), the same target context and the same renderer (under its time and size limits) a run's plan uses,
 * for one code alone. It only reads: nothing is written and no audit entry is made.
 */
import {
  CODE_PREVIEW_FILE_CHARS,
  type CodePreview,
  type CodePreviewRequest,
  codeDefinitionSchema,
} from "../../shared/schemas/codes";
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { validateParameters } from "../execution/parameters";
import { targetTemplateContext } from "../execution/target-context";
import { renderCodeFiles } from "../execution/templates/render";
import { AppError } from "../http/errors";
import { codeForCaller } from "./codes.service";
import { loadRunTarget } from "./targets.service";

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

  let rendered: ReturnType<typeof renderCodeFiles>;
  try {
    rendered = renderCodeFiles(definition, checked.parameters, target ? targetTemplateContext(target) : null);
  } catch (error) {
    throw new AppError(422, "template_failed", (error as Error).message);
  }
  return {
    parameters: checked.parameters,
    target: target
      ? { id: target.target.id, name: target.target.name, version: target.version.version }
      : null,
    files: rendered.files.map((file) => ({ fileName: file.fileName, ...previewText(file.content) })),
    arguments: rendered.argv,
  };
}
