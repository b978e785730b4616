import { Badge } from "@/components/ui/badge";

type UserBadgeProps = {
  displayName: string;
  email: string;
  /** "Site admin", or the person's role in the group in view. */
  roleLabel: string | null;
};

function initials(name: string): string {
  const parts = name.trim().split(/\s+/);
  return `${parts[0]?.[0] ?? ""}${parts.length > 1 ? (parts[parts.length - 1]?.[0] ?? "") : ""}`.toUpperCase();
}

export function UserBadge({ displayName, email, roleLabel }: UserBadgeProps) {
  return (
    <div className="flex items-center gap-3">
      <span
        aria-hidden="true"
        className="flex size-8 items-center justify-center rounded-full bg-ink-800 text-xs font-semibold text-flux-200"
      >
        {initials(displayName)}
      </span>
      <div className="hidden min-w-0 leading-tight sm:block">
        <p className="truncate text-sm font-medium text-ink-900">{displayName}</p>
        <p className="truncate text-xs text-ink-500">{email}</p>
      </div>
      {roleLabel ? (
        <span className="hidden sm:inline">
          <Badge tone={roleLabel === "Site admin" ? "ink" : "flux"}>{roleLabel}</Badge>
        </span>
      ) : null}
    </div>
  );
}
