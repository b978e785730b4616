import type { ComponentProps } from "react";
import { cn } from "@/lib/cn";
import { Spinner } from "./spinner";

export type ButtonVariant = "primary" | "secondary" | "danger" | "ghost" | "ghost-danger";
export type ButtonSize = "sm" | "md" | "lg";

const variantClasses: Record<ButtonVariant, string> = {
  primary: "bg-flux-700 text-white shadow-sm hover:bg-flux-800 disabled:bg-flux-700/60",
  secondary:
    "border border-ink-200 bg-white text-ink-800 shadow-sm hover:border-ink-300 hover:bg-ink-50 disabled:text-ink-400",
  danger: "bg-ember-700 text-white shadow-sm hover:bg-ember-600 disabled:bg-ember-700/60",
  ghost: "text-ink-700 hover:bg-ink-100 disabled:text-ink-300",
  "ghost-danger": "text-ember-700 hover:bg-ember-50 disabled:text-ink-300",
};

const sizeClasses: Record<ButtonSize, string> = {
  sm: "h-8 gap-1.5 px-3 text-sm",
  md: "h-10 gap-2 px-4 text-sm",
  lg: "h-12 gap-2.5 px-6 text-base",
};

export function buttonClasses(
  options: { variant?: ButtonVariant; size?: ButtonSize; className?: string } = {},
) {
  return cn(
    "inline-flex shrink-0 items-center justify-center rounded-lg font-medium whitespace-nowrap transition-colors disabled:cursor-not-allowed",
    variantClasses[options.variant ?? "primary"],
    sizeClasses[options.size ?? "md"],
    options.className,
  );
}

type ButtonProps = ComponentProps<"button"> & {
  variant?: ButtonVariant;
  size?: ButtonSize;
  /** Shows a spinner and blocks repeated clicks while a request is in flight. */
  pending?: boolean;
};

export function Button({
  variant,
  size,
  pending = false,
  className,
  children,
  type = "button",
  disabled,
  ...props
}: ButtonProps) {
  return (
    <button
      type={type}
      disabled={disabled || pending}
      aria-busy={pending || undefined}
      className={buttonClasses({ variant, size, className })}
      {...props}
    >
      {pending ? <Spinner /> : null}
      {children}
    </button>
  );
}
