import type { GroupRole, MemberList } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { removeMember, updateMemberRole } from "../api/change-member";
import { memberQueries } from "../api/member-queries";

type Options = {
  /** Lets the caller refresh what else depends on membership (the person's groups, member counts). */
  onChanged?: () => void;
};

export function useUpdateMemberRole(groupId: string, options: Options = {}) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: GroupRole }) =>
      updateMemberRole(groupId, userId, role),
    onSuccess: async (updated) => {
      // Write the answer in first so the select does not flick back while the list refetches.
      queryClient.setQueryData(memberQueries.list(groupId).queryKey, (current: MemberList | undefined) =>
        current
          ? {
              members: current.members.map((member) => (member.userId === updated.userId ? updated : member)),
            }
          : current,
      );
      options.onChanged?.();
      await queryClient.invalidateQueries({ queryKey: memberQueries.list(groupId).queryKey });
    },
  });
}

export function useRemoveMember(groupId: string, options: Options = {}) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => removeMember(groupId, userId),
    onSuccess: async () => {
      options.onChanged?.();
      await queryClient.invalidateQueries({ queryKey: memberQueries.list(groupId).queryKey });
    },
  });
}
