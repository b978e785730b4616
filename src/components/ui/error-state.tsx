import type { ReactNode } from "react";
import { cn } from "@/lib/cn";
import { describeError } from "@/lib/describe-error";
import { signInHref } from "@/lib/return-to";
import { Button, buttonClasses } from "./button";

type ErrorStateProps = {
  error: unknown;
  /** Offered when trying again may help (network or server faults). */
  onRetry?: () => void;
  retrying?: boolean;
  title?: string;
  /** Extra way out, such as a link home. */
  action?: ReactNode;
  className?: string;
};

export function ErrorState({ error, onRetry, retrying, title, action, className }: ErrorStateProps) {
  const description = describeError(error);
  const returnTo = `${window.location.pathname}${window.location.search}`;
  return (
    <div
      role="alert"
      className={cn("rounded-xl border border-ember-100 bg-ember-50/60 px-5 py-5", className)}
    >
      <div className="flex items-start gap-3">
        <svg viewBox="0 0 20 20" aria-hidden="true" className="mt-0.5 size-5 shrink-0 text-ember-600">
          <path
            d="M10 2.5 18 17H2L10 2.5Z"
            fill="none"
            stroke="currentColor"
            strokeWidth="1.6"
            strokeLinejoin="round"
          />
          <path d="M10 8v4M10 14.3v.2" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
        </svg>
        <div className="min-w-0 flex-1">
          <h2 className="text-sm font-semibold text-ember-700">{title ?? description.title}</h2>
          <p className="mt-1 text-sm text-ink-700">{description.message}</p>
          <div className="mt-4 flex flex-wrap gap-2">
            {description.signedOut ? (
              <a href={signInHref(returnTo)} className={buttonClasses({ size: "sm" })}>
                Sign in again
              </a>
            ) : null}
            {onRetry && description.retryable ? (
              <Button size="sm" variant="secondary" onClick={onRetry} pending={retrying}>
                Try again
              </Button>
            ) : null}
            {action}
          </div>
        </div>
      </div>
    </div>
  );
}
