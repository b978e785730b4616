import { type CreateTargetRequest, targetSummarySchema } from "@shared/schemas";
import { api } from "@/lib/api-client";

/** Enters a new target (its version 1) from atoms or the text of an XYZ file. */
export function createTarget(groupId: string, request: CreateTargetRequest) {
  return api.post(`/api/groups/${encodeURIComponent(groupId)}/targets`, request, targetSummarySchema);
}
