import { useId } from "react";

export type GroupOption = { id: string; name: string };

type GroupSwitcherProps = {
  groups: GroupOption[];
  currentGroupId: string | null;
  onSelect: (groupId: string) => void;
};

/** A native select: keyboard, screen reader and mobile behaviour come for free. */
export function GroupSwitcher({ groups, currentGroupId, onSelect }: GroupSwitcherProps) {
  const id = useId();
  const known = groups.some((group) => group.id === currentGroupId);
  return (
    <div className="flex min-w-0 items-center gap-2">
      <label
        htmlFor={id}
        className="sr-only text-xs font-medium tracking-wide text-ink-500 uppercase sm:not-sr-only"
      >
        Group
      </label>
      <div className="relative min-w-0 flex-1 sm:flex-none">
        <select
          id={id}
          value={known && currentGroupId ? currentGroupId : ""}
          onChange={(event) => {
            if (event.target.value) onSelect(event.target.value);
          }}
          className="h-9 w-full min-w-0 appearance-none truncate sm:w-auto sm:max-w-72 sm:min-w-44 rounded-lg border border-ink-200 bg-white pr-9 pl-3 text-sm font-medium text-ink-900 shadow-xs hover:border-ink-300"
        >
          {known ? null : (
            <option value="" disabled>
              Choose a group…
            </option>
          )}
          {groups.map((group) => (
            <option key={group.id} value={group.id}>
              {group.name}
            </option>
          ))}
        </select>
        <svg
          viewBox="0 0 20 20"
          aria-hidden="true"
          className="pointer-events-none absolute top-1/2 right-3 size-4 -translate-y-1/2 text-ink-400"
        >
          <path
            d="M6 8l4-4 4 4M6 12l4 4 4-4"
            fill="none"
            stroke="currentColor"
            strokeWidth="1.6"
            strokeLinecap="round"
          />
        </svg>
      </div>
    </div>
  );
}
