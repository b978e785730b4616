import { useQueryErrorResetBoundary } from "@tanstack/react-query";
import { Compass, ShieldOff } from "lucide-react";
import { isRouteErrorResponse, Link, useRevalidator, useRouteError } from "react-router-dom";
import { buttonClasses } from "@/components/ui/button";
import { EmptyState } from "@/components/ui/empty-state";
import { ErrorState } from "@/components/ui/error-state";
import { hasStatus } from "@/lib/api-error";
import { paths } from "@/lib/paths";

function HomeLink() {
  return (
    <Link to={paths.home()} className={buttonClasses({ variant: "secondary", size: "sm" })}>
      Go to your workspace
    </Link>
  );
}

export function NotFoundState({ message }: { message?: string }) {
  return (
    <EmptyState
      icon={<Compass className="size-5" aria-hidden="true" />}
      title="Nothing here"
      action={<HomeLink />}
    >
      {message ??
        "This address does not lead to a Sigmaflow page. It may have moved, or the link may be incomplete."}
    </EmptyState>
  );
}

/**
 * Shown in place of a route whose loader or rendering failed. "Try again" clears failed queries and
 * re-runs the loaders, so a passing fault (a restarted server) heals without a page reload.
 */
export function RouteErrorBoundary() {
  const error = useRouteError();
  const revalidator = useRevalidator();
  const { reset } = useQueryErrorResetBoundary();

  if (isRouteErrorResponse(error)) {
    const message = typeof error.data === "string" ? error.data : undefined;
    if (error.status === 404) return <NotFoundState message={message} />;
    if (error.status === 403) {
      return (
        <EmptyState
          icon={<ShieldOff className="size-5" aria-hidden="true" />}
          title="This page is not open to you"
          action={<HomeLink />}
        >
          {message ?? "Your role does not include this page."}
        </EmptyState>
      );
    }
  }

  if (hasStatus(error, 404) || hasStatus(error, 403)) {
    return (
      <EmptyState
        icon={<ShieldOff className="size-5" aria-hidden="true" />}
        title="This group is not available to you"
        action={<HomeLink />}
      >
        It does not exist, or you are not one of its members. Ask one of its admins for an invitation.
      </EmptyState>
    );
  }

  return (
    <ErrorState
      error={error}
      retrying={revalidator.state === "loading"}
      onRetry={() => {
        reset();
        void revalidator.revalidate();
      }}
      action={<HomeLink />}
    />
  );
}
