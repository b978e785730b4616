import type { SelectHTMLAttributes } from "react";
import { cn } from "@/lib/cn";
import { controlClasses } from "./input";

type SelectProps = SelectHTMLAttributes<HTMLSelectElement> & { controlSize?: "sm" | "md" };

export function Select({ className, children, controlSize = "md", ...props }: SelectProps) {
  return (
    <div className={cn("relative", className)}>
      <select
        className={cn(
          controlClasses,
          "appearance-none",
          controlSize === "sm" ? "h-8 pr-8 pl-2.5" : "h-10 pr-9",
        )}
        {...props}
      >
        {children}
      </select>
      <svg
        viewBox="0 0 20 20"
        aria-hidden="true"
        className={cn(
          "pointer-events-none absolute top-1/2 -translate-y-1/2 text-ink-400",
          controlSize === "sm" ? "right-2 size-3.5" : "right-3 size-4",
        )}
      >
        <path d="M5 8l5 5 5-5" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" />
      </svg>
    </div>
  );
}
