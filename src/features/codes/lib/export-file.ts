/**
 * Export and import of code definitions as files: the document the export endpoint answers, saved as
 * JSON, and read back (size-bounded) and checked with the same contract before it is sent.
 */
import { type CodeDefinition, type CodeExport, codeImportSchema } from "@shared/schemas";
import type { z } from "zod";

/** Larger files are refused before reading: a hundred full definitions fit well within it. */
export const MAX_IMPORT_BYTES = 8 * 1024 * 1024;

export function exportDocument(definitions: CodeDefinition[]): CodeExport {
  return { format: "sigmaflow-code-definitions", version: 1, codes: definitions };
}

/** Offers the document as a download named after what it holds. */
export function downloadJson(fileName: string, document: unknown): void {
  const blob = new Blob([`${JSON.stringify(document, null, 2)}\n`], { type: "application/json" });
  const url = URL.createObjectURL(blob);
  const link = window.document.createElement("a");
  link.href = url;
  link.download = fileName;
  window.document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}

export type ImportProblem = { path: string; message: string };
export type ReadImport = { ok: true; document: CodeExport } | { ok: false; problems: ImportProblem[] };

const zodProblems = (error: z.ZodError): ImportProblem[] =>
  error.issues.map((issue) => ({ path: issue.path.map(String).join("."), message: issue.message }));

/** Reads an export file, or a file of one definition: JSON, then the import contract (1 to 100 definitions). */
export async function readImportFile(file: File): Promise<ReadImport> {
  if (file.size > MAX_IMPORT_BYTES) {
    return {
      ok: false,
      problems: [{ path: "", message: `The file is larger than ${MAX_IMPORT_BYTES / 1024 / 1024} MB.` }],
    };
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(await file.text());
  } catch (error) {
    return { ok: false, problems: [{ path: "", message: `Not JSON: ${(error as Error).message}` }] };
  }
  // A file holding one bare definition (as the API registers it) is taken as a document of one.
  const isBare =
    typeof parsed === "object" && parsed !== null && !Array.isArray(parsed) && !("format" in parsed);
  const checked = codeImportSchema.safeParse(
    isBare ? { format: "sigmaflow-code-definitions", version: 1, codes: [parsed] } : parsed,
  );
  if (!checked.success) return { ok: false, problems: zodProblems(checked.error) };
  return { ok: true, document: checked.data };
}

/** A definition typed as JSON text, checked against the contract before it goes to the server. */
export function readDefinitionText(
  text: string,
  schema: z.ZodType<CodeDefinition>,
): { ok: true; definition: CodeDefinition } | { ok: false; problems: ImportProblem[] } {
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    return { ok: false, problems: [{ path: "", message: `Not JSON: ${(error as Error).message}` }] };
  }
  const checked = schema.safeParse(parsed);
  if (!checked.success) return { ok: false, problems: zodProblems(checked.error) };
  return { ok: true, definition: checked.data };
}
