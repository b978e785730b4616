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

/** Saves a new version of a target (what is left out keeps the current version's value). */
export function updateTarget(targetId: string, request: UpdateTargetRequest) {
  return api.patch(`/api/targets/${encodeURIComponent(targetId)}`, request, targetDetailSchema);
}

/** Enters an isotopologue of a target: its current geometry with other mass numbers on some atoms. */
export function createIsotopologue(targetId: string, request: CreateIsotopologueRequest) {
  return api.post(`/api/targets/${encodeURIComponent(targetId)}/isotopologues`, request, targetDetailSchema);
}
