import { Menu } from "lucide-react";
import { useMatch, useNavigate } from "react-router-dom";
import { Skeleton } from "@/components/ui/skeleton";
import { SignOutButton } from "@/features/auth/components/sign-out-button";
import { UserBadge } from "@/features/auth/components/user-badge";
import { GroupSwitcher } from "@/features/groups/components/group-switcher";
import {
  ADMIN_ONLY_SECTIONS,
  DEFAULT_GROUP_SECTION,
  type GroupSection,
  isGroupSection,
  paths,
} from "@/lib/paths";
import { canManageGroup, roleInGroup } from "@/lib/permissions";
import { ROLE_LABELS } from "@/lib/roles";
import type { Workspace } from "./use-workspace";

type AppHeaderProps = {
  workspace: Workspace;
  onOpenMenu: () => void;
};

export function AppHeader({ workspace, onOpenMenu }: AppHeaderProps) {
  const { me, groups, groupsError, activeGroupId } = workspace;
  const navigate = useNavigate();
  const groupMatch = useMatch("/groups/:groupId/:section/*");
  const currentSection = groupMatch?.params.section;

  function switchGroup(groupId: string) {
    // Stay on the same kind of page in the new group, unless that page is closed to the person there.
    let section: GroupSection = isGroupSection(currentSection) ? currentSection : DEFAULT_GROUP_SECTION;
    if (ADMIN_ONLY_SECTIONS.includes(section) && !canManageGroup(me, groupId)) section = "members";
    navigate(paths.group(groupId, section));
  }

  const role = activeGroupId ? roleInGroup(me, activeGroupId) : null;
  const roleLabel = me.user.isSiteAdmin ? "Site admin" : role ? ROLE_LABELS[role] : null;

  return (
    <header className="sticky top-0 z-30 flex h-16 items-center gap-4 border-b border-ink-100 bg-white/90 px-4 backdrop-blur lg:px-8">
      <button
        type="button"
        onClick={onOpenMenu}
        className="-ml-1 inline-flex items-center gap-2 rounded-lg p-2 text-sm font-medium text-ink-700 hover:bg-ink-50 lg:hidden"
      >
        <Menu className="size-5" aria-hidden="true" />
        <span className="sr-only sm:not-sr-only">Menu</span>
      </button>
      <div className="min-w-0 flex-1">
        {groups === undefined ? (
          groupsError ? (
            <p role="alert" className="text-sm text-ember-700">
              Could not load the list of groups.
            </p>
          ) : (
            <Skeleton className="h-9 w-56" />
          )
        ) : groups.length > 0 ? (
          <GroupSwitcher groups={groups} currentGroupId={activeGroupId} onSelect={switchGroup} />
        ) : null}
      </div>
      <UserBadge displayName={me.user.displayName} email={me.user.email} roleLabel={roleLabel} />
      <SignOutButton />
    </header>
  );
}
