import { api } from "@/lib/api-client";

export function signOut(): Promise<void> {
  return api.command("POST", "/api/auth/logout");
}
