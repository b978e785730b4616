import type { ReactNode } from "react";
import { cn } from "@/lib/cn";

export type NoticeTone = "info" | "success" | "warning" | "error";

const toneClasses: Record<NoticeTone, string> = {
  info: "border-ink-100 bg-ink-50 text-ink-800",
  success: "border-flux-200 bg-flux-50 text-flux-900",
  warning: "border-ember-100 bg-ember-50 text-ember-700",
  error: "border-ember-100 bg-ember-50 text-ember-700",
};

type NoticeProps = {
  tone?: NoticeTone;
  title?: string;
  children?: ReactNode;
  onDismiss?: () => void;
  className?: string;
};

/** Inline message beside the thing it is about; errors interrupt screen readers, the rest wait politely. */
export function Notice({ tone = "info", title, children, onDismiss, className }: NoticeProps) {
  return (
    <div
      role={tone === "error" ? "alert" : "status"}
      className={cn(
        "flex items-start gap-3 rounded-lg border px-4 py-3 text-sm",
        toneClasses[tone],
        className,
      )}
    >
      <div className="min-w-0 flex-1">
        {title ? <p className="font-semibold">{title}</p> : null}
        {children ? <div className={cn(title && "mt-0.5")}>{children}</div> : null}
      </div>
      {onDismiss ? (
        <button
          type="button"
          onClick={onDismiss}
          className="-m-1 rounded p-1 text-xs font-medium underline-offset-2 hover:underline"
        >
          Dismiss
        </button>
      ) : null}
    </div>
  );
}
