import { LogOut } from "lucide-react";
import { Button } from "@/components/ui/button";
import { describeError } from "@/lib/describe-error";
import { useSignOut } from "../hooks/use-sign-out";

export function SignOutButton() {
  const signOut = useSignOut();
  return (
    <div className="flex items-center gap-2">
      {signOut.isError ? (
        <span role="alert" className="text-xs text-ember-700">
          {describeError(signOut.error).message}
        </span>
      ) : null}
      <Button variant="ghost" size="sm" pending={signOut.isPending} onClick={() => signOut.mutate()}>
        {signOut.isPending ? null : <LogOut className="size-4" aria-hidden="true" />}
        <span className="sr-only sm:not-sr-only">Sign out</span>
      </Button>
    </div>
  );
}
