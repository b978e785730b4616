import { useMutation } from "@tanstack/react-query";
import { signOut } from "../api/sign-out";

/**
 * Ends the session, then loads the sign-in page afresh: a full page load drops every cached answer
 * of the previous person rather than trusting each cache entry to be cleared.
 */
export function useSignOut() {
  return useMutation({
    mutationFn: signOut,
    onSuccess: () => window.location.assign("/signin"),
  });
}
