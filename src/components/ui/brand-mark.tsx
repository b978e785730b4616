import { cn } from "@/lib/cn";

/**
 * Sigmaflow's mark: a projectile path bending past a scattering centre, inside the dashed circle of
 * its interaction range.
 */
export function BrandMark({ className, title }: { className?: string; title?: string }) {
  return (
    <svg
      viewBox="0 0 32 32"
      className={cn("size-8", className)}
      role={title ? "img" : undefined}
      aria-hidden={title ? undefined : true}
      aria-label={title}
    >
      <rect width="32" height="32" rx="8" fill="#17203a" />
      <circle
        cx="17.5"
        cy="17.5"
        r="7"
        fill="none"
        stroke="#38c7ac"
        strokeOpacity="0.45"
        strokeDasharray="1.6 2.2"
      />
      <circle cx="17.5" cy="17.5" r="2.6" fill="#38c7ac" />
      <path
        d="M3.5 22.5 C 9 22.5, 12.5 22, 14.2 19.6 C 16.2 16.6, 19.5 9.5, 28.5 5.5"
        fill="none"
        stroke="#e3e9f4"
        strokeWidth="2"
        strokeLinecap="round"
      />
    </svg>
  );
}

export function Wordmark({ className }: { className?: string }) {
  return (
    <span className={cn("inline-flex items-center gap-2.5", className)}>
      <BrandMark />
      <span className="text-lg font-semibold tracking-tight">Sigmaflow</span>
    </span>
  );
}
