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
 * Enters a target from an XYZ file as it was chosen or dropped: the file itself goes to the server's
 * upload route (multipart, at most 256 KiB, read there with the same parser) beside the form's fields.
 */
export function uploadTarget(
  groupId: string,
  file: File,
  fields: { name: string; charge: number; multiplicity?: number },
) {
  const form = new FormData();
  form.set("name", fields.name);
  form.set("charge", String(fields.charge));
  form.set("multiplicity", fields.multiplicity === undefined ? "" : String(fields.multiplicity));
  form.set("file", file);
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
