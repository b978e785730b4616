/**
 * What flows between the stages of a recipe. A run copies every output file a stage's code declares into
 * the next stage's folder after the stage succeeds (server/execution/run-plan.ts), so the next code can
 * read them by name. From the definitions alone this says which of those files the next code names in
 * its templates, arguments or standard input (so it evidently reads them), and which ones would replace
 * an input file the next code renders under the same name.
 */
import type { CodeDefinition } from "@shared/schemas";

export type HandedFile = {
  fileName: string;
  /** The next code names the file in a template, an argument or as its standard input. */
  namedByNext: boolean;
  /** The next code renders an input file of this name, which the copied file replaces. */
  replacesInput: boolean;
  /** Sigmaflow also reads the file for results, with this reader. */
  reader: string | null;
};

export type StageLink = { from: number; to: number; files: HandedFile[] };

function mentions(definition: CodeDefinition, fileName: string): boolean {
  if (definition.stdinFile === fileName) return true;
  if (definition.arguments.some((argument) => argument.includes(fileName))) return true;
  return definition.inputTemplates.some((input) => input.template.includes(fileName));
}

/** The links between consecutive stages; a stage whose code is unknown (null) hands on nothing known. */
export function stageLinks(definitions: (CodeDefinition | null)[]): StageLink[] {
  const links: StageLink[] = [];
  for (let i = 0; i + 1 < definitions.length; i++) {
    const from = definitions[i];
    const to = definitions[i + 1];
    const files = (from?.outputFiles ?? []).map((fileName) => ({
      fileName,
      namedByNext: to ? mentions(to, fileName) : false,
      replacesInput: to ? to.inputTemplates.some((input) => input.fileName === fileName) : false,
      reader: from?.resultFiles.find((result) => result.fileName === fileName)?.reader ?? null,
    }));
    links.push({ from: i, to: i + 1, files });
  }
  return links;
}
