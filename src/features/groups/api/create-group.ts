import { type CreateGroupRequest, groupSchema } from "@shared/schemas";
import { api } from "@/lib/api-client";

export function createGroup(request: CreateGroupRequest) {
  return api.post("/api/groups", request, groupSchema);
}
