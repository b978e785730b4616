import {
  Atom,
  Building2,
  Cpu,
  History,
  KeyRound,
  ListChecks,
  type LucideIcon,
  MailPlus,
  TrendingUp,
  UserRound,
  Users,
} from "lucide-react";
import { NavLink } from "react-router-dom";
import { Wordmark } from "@/components/ui/brand-mark";
import { HealthIndicator } from "@/features/health/components/health-indicator";
import { cn } from "@/lib/cn";
import { paths } from "@/lib/paths";

type NavItem = { to: string; label: string; icon: LucideIcon };

function NavSection({
  title,
  items,
  onNavigate,
}: {
  title: string;
  items: NavItem[];
  onNavigate?: () => void;
}) {
  return (
    <div>
      <h2 className="mb-1.5 px-3 text-[0.68rem] font-semibold tracking-[0.14em] text-ink-400 uppercase">
        {title}
      </h2>
      <ul className="flex flex-col gap-0.5">
        {items.map((item) => (
          <li key={item.to}>
            <NavLink
              to={item.to}
              onClick={onNavigate}
              className={({ isActive }) =>
                cn(
                  "group flex items-center gap-3 rounded-lg px-3 py-2 text-sm font-medium transition-colors",
                  isActive
                    ? "bg-ink-800 text-white shadow-[inset_2px_0_0_#38c7ac]"
                    : "text-ink-300 hover:bg-ink-900 hover:text-white",
                )
              }
            >
              {({ isActive }) => (
                <>
                  <item.icon
                    aria-hidden="true"
                    className={cn(
                      "size-4",
                      isActive ? "text-flux-300" : "text-ink-400 group-hover:text-ink-200",
                    )}
                  />
                  {item.label}
                </>
              )}
            </NavLink>
          </li>
        ))}
      </ul>
    </div>
  );
}

type SidebarNavProps = {
  activeGroupId: string | null;
  canManageGroup: boolean;
  isSiteAdmin: boolean;
  onNavigate?: () => void;
};

export function SidebarNav({ activeGroupId, canManageGroup, isSiteAdmin, onNavigate }: SidebarNavProps) {
  const workspace: NavItem[] = activeGroupId
    ? [
        { to: paths.group(activeGroupId, "targets"), label: "Targets", icon: Atom },
        { to: paths.group(activeGroupId, "codes"), label: "Codes", icon: Cpu },
        { to: paths.group(activeGroupId, "runs"), label: "Runs", icon: ListChecks },
        { to: paths.group(activeGroupId, "studies"), label: "Studies", icon: TrendingUp },
      ]
    : [];
  const group: NavItem[] = activeGroupId
    ? [
        { to: paths.group(activeGroupId, "members"), label: "Members", icon: Users },
        ...(canManageGroup
          ? [
              { to: paths.group(activeGroupId, "invitations"), label: "Invitations", icon: MailPlus },
              { to: paths.group(activeGroupId, "activity"), label: "Activity", icon: History },
            ]
          : []),
      ]
    : [];
  const admin: NavItem[] = [
    { to: paths.adminGroups(), label: "Groups", icon: Building2 },
    { to: paths.adminPeople(), label: "People", icon: UserRound },
  ];

  return (
    <div className="flex h-full flex-col bg-ink-950 text-ink-100">
      <div className="px-5 pt-5 pb-6">
        <Wordmark className="text-white" />
      </div>
      <nav aria-label="Main" className="flex flex-1 flex-col gap-6 overflow-y-auto px-3">
        {workspace.length > 0 ? (
          <NavSection title="Workspace" items={workspace} onNavigate={onNavigate} />
        ) : null}
        {group.length > 0 ? <NavSection title="Group" items={group} onNavigate={onNavigate} /> : null}
        {isSiteAdmin ? <NavSection title="Admin" items={admin} onNavigate={onNavigate} /> : null}
        <NavSection
          title="Settings"
          items={[{ to: paths.apiTokens(), label: "API tokens", icon: KeyRound }]}
          onNavigate={onNavigate}
        />
        {activeGroupId ? null : (
          <p className="px-3 text-xs leading-relaxed text-ink-400">
            Targets, codes, runs and studies belong to a research group. They appear here once you join one.
          </p>
        )}
      </nav>
      <div className="border-t border-ink-800 px-5 py-4">
        <HealthIndicator />
      </div>
    </div>
  );
}
