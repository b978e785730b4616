import type { InputHTMLAttributes, TextareaHTMLAttributes } from "react";
import { cn } from "@/lib/cn";

export const controlClasses =
  "block w-full rounded-lg border border-ink-200 bg-white px-3 text-sm text-ink-900 shadow-xs placeholder:text-ink-400 transition-colors hover:border-ink-300 focus:border-flux-500 aria-[invalid=true]:border-ember-600 aria-[invalid=true]:bg-ember-50/40 disabled:bg-ink-50 disabled:text-ink-400";

export function Input({ className, ...props }: InputHTMLAttributes<HTMLInputElement>) {
  return <input className={cn(controlClasses, "h-10", className)} {...props} />;
}

export function Textarea({ className, ...props }: TextareaHTMLAttributes<HTMLTextAreaElement>) {
  return <textarea className={cn(controlClasses, "min-h-24 py-2", className)} {...props} />;
}
