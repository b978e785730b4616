import {
  type CreateIsotopologueRequest,
  type CreateTargetRequest,
  targetDetailSchema,
  targetSummarySchema,
  type UpdateTargetRequest,
} from "@shared/schemas";
import { api } from "@/lib/api-client";

/** Enters a new target (its version 1) from atoms or the text of an XYZ file. */
export function createTarget(groupId: string, request: CreateTargetRequest) {
  return api.post(`/api/groups/${encodeURIComponent(groupId)}/targets`, request, targetSummarySchema);
}

/**
 * Enters a new target from an XYZ file, uploaded as multipart/form-data (field "file", at most 256 KiB)
 * beside the name, charge and multiplicity; the server reads it and names the line at fault.
 */
export function uploadTarget(
  groupId: string,
  fields: { name: string; charge?: number; multiplicity?: number },
  file: File,
) {
  const form = new FormData();
  form.append("name", fields.name);
  if (fields.charge !== undefined) form.append("charge", String(fields.charge));
  if (fields.multiplicity !== undefined) form.append("multiplicity", String(fields.multiplicity));
  form.append("file", file, file.name);
  return api.postForm(`/api/groups/${encodeURIComponent(groupId)}/targets/upload`, form, targetSummarySchema);
}

/** Saves a new version of a target (what is left out keeps the current version's value). */
export function updateTarget(targetId: string, request: UpdateTargetRequest) {
  return api.patch(`/api/targets/${encodeURIComponent(targetId)}`, request, targetDetailSchema);
}

/** Enters an isotopologue of a target: its current geometry with other mass numbers on some atoms. */
export function createIsotopologue(targetId: string, request: CreateIsotopologueRequest) {
  return api.post(`/api/targets/${encodeURIComponent(targetId)}/isotopologues`, request, targetDetailSchema);
}
