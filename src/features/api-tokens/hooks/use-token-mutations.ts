import { useMutation, useQueryClient } from "@tanstack/react-query";
import { createApiToken, revokeApiToken } from "../api/token-commands";
import { tokenQueries } from "../api/token-queries";

export function useCreateApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createApiToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: tokenQueries.all }),
  });
}

export function useRevokeApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: revokeApiToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: tokenQueries.all }),
  });
}
