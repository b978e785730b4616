import { type CreateApiTokenRequest, createdApiTokenSchema } from "@shared/schemas";
import { api } from "@/lib/api-client";

export function createApiToken(request: CreateApiTokenRequest) {
  return api.post("/api/tokens", request, createdApiTokenSchema);
}

export function revokeApiToken(tokenId: string) {
  return api.command("DELETE", `/api/tokens/${encodeURIComponent(tokenId)}`);
}
