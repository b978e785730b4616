import {
  type CodeDefinitionInput,
  type CodeExport,
  type CodePreviewRequest,
  type CreateRecipeRequest,
  codeExportSchema,
  codeListSchema,
  codePreviewSchema,
  codeSchema,
  recipeSchema,
} from "@shared/schemas";
import { api } from "@/lib/api-client";

const groupPath = (groupId: string) => `/api/groups/${encodeURIComponent(groupId)}`;

/** Registers a definition: a new code, or a new version of one (a name and version are never replaced). */
export function registerCode(groupId: string, definition: CodeDefinitionInput) {
  return api.post(`${groupPath(groupId)}/codes`, definition, codeSchema);
}

/** Imports a document of definitions: all of them, or on any problem none. */
export function importCodes(groupId: string, document: CodeExport) {
  return api.post(`${groupPath(groupId)}/codes/import`, document, codeListSchema);
}

/** The group's definitions as the export document. */
export function exportCodes(groupId: string) {
  return api.get(`${groupPath(groupId)}/codes/export`, codeExportSchema);
}

/** Retires a code version (no new recipes or runs may use it) or brings it back. */
export function setCodeRetired(codeId: string, retired: boolean) {
  return api.patch(`/api/codes/${encodeURIComponent(codeId)}`, { retired }, codeSchema);
}

/** Sets the hosts a code version is installed on (the whole list; empty: any of the group's hosts). */
export function setCodeHosts(codeId: string, hostIds: string[]) {
  return api.patch(`/api/codes/${encodeURIComponent(codeId)}`, { hostIds }, codeSchema);
}

export function deleteCode(codeId: string) {
  return api.command("DELETE", `/api/codes/${encodeURIComponent(codeId)}`);
}

/** Renders a code's input files for a target and parameters; writes nothing. */
export function previewCode(codeId: string, request: CodePreviewRequest) {
  return api.post(`/api/codes/${encodeURIComponent(codeId)}/preview`, request, codePreviewSchema);
}

export function createRecipe(groupId: string, request: CreateRecipeRequest) {
  return api.post(`${groupPath(groupId)}/recipes`, request, recipeSchema);
}

export function deleteRecipe(recipeId: string) {
  return api.command("DELETE", `/api/recipes/${encodeURIComponent(recipeId)}`);
}
