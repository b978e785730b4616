import { useMutation, useQueryClient } from "@tanstack/react-query";
import { createGroup } from "../api/create-group";
import { groupQueries } from "../api/group-queries";

export function useCreateGroup() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createGroup,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: groupQueries.all }),
  });
}
