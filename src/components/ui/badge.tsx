import type { ReactNode } from "react";
import { cn } from "@/lib/cn";

export type BadgeTone = "neutral" | "flux" | "ink" | "ember" | "muted";

const toneClasses: Record<BadgeTone, string> = {
  neutral: "bg-ink-50 text-ink-700 ring-ink-200",
  flux: "bg-flux-50 text-flux-800 ring-flux-200",
  ink: "bg-ink-800 text-ink-50 ring-ink-800",
  ember: "bg-ember-50 text-ember-700 ring-ember-100",
  muted: "bg-white text-ink-500 ring-ink-100",
};

export function Badge({
  tone = "neutral",
  className,
  children,
}: {
  tone?: BadgeTone;
  className?: string;
  children: ReactNode;
}) {
  return (
    <span
      className={cn(
        "inline-flex items-center rounded-full px-2 py-0.5 text-xs font-medium whitespace-nowrap ring-1 ring-inset",
        toneClasses[tone],
        className,
      )}
    >
      {children}
    </span>
  );
}
