import type { Code } from "@shared/schemas";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useId, useState } from "react";
import { Button } from "@/components/ui/button";
import { ErrorState } from "@/components/ui/error-state";
import { isApiRequestError } from "@/lib/api-error";
import { fieldErrorsFromDetails } from "@/lib/field-errors";
import { setCodeHosts } from "../api/code-commands";
import { codeHostQueries, codeQueries } from "../api/code-queries";
import { hostIdsToSave } from "../lib/code-hosts";

/** The server's refusal in words: its message, and what it said of single hosts. */
function problemOf(error: Error): string {
  if (!isApiRequestError(error) || error.status !== 422) return error.message;
  const details = Object.entries(fieldErrorsFromDetails(error.details))
    .filter(([path]) => path.startsWith("hostIds"))
    .map(([, message]) => message);
  return [error.message, ...details].join(" ");
}

type Props = { groupId: string; code: Code; canWrite: boolean };

/**
 * The group's hosts this code version is installed on, as ticks. None ticked: any host may run it.
 * Members and admins save the list; others read it.
 */
export function CodeHostsSection({ groupId, code, canWrite }: Props) {
  const queryClient = useQueryClient();
  const hosts = useQuery(codeHostQueries.list(groupId));
  const [ticked, setTicked] = useState<ReadonlySet<string>>(() => new Set(code.hostIds ?? []));
  const id = useId();
  const hintId = `${id}-hint`;
  const errorId = `${id}-error`;
  const save = useMutation({
    mutationFn: (hostIds: string[]) => setCodeHosts(code.id, hostIds),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: codeQueries.all });
    },
  });
  const toggle = (hostId: string, on: boolean) => {
    save.reset();
    setTicked((previous) => {
      const next = new Set(previous);
      if (on) next.add(hostId);
      else next.delete(hostId);
      return next;
    });
  };

  return (
    <fieldset aria-describedby={[hintId, save.error ? errorId : null].filter(Boolean).join(" ")}>
      <legend className="text-sm font-semibold text-ink-900">Installed on</legend>
      <p id={hintId} className="mt-1 text-xs text-ink-500">
        None ticked: any of the group's hosts may run this version. Runs of a recipe go only to a host where
        every stage's code is installed.
      </p>
      {hosts.isPending ? (
        <p className="mt-3 text-sm text-ink-500">Loading hosts…</p>
      ) : hosts.isError ? (
        <ErrorState
          className="mt-3"
          error={hosts.error}
          onRetry={() => hosts.refetch()}
          retrying={hosts.isFetching}
        />
      ) : hosts.data.hosts.length === 0 ? (
        <p className="mt-3 text-sm text-ink-500">The group has no hosts yet.</p>
      ) : (
        <ul className="mt-3 flex flex-col gap-2">
          {hosts.data.hosts.map((host) => (
            <li key={host.id}>
              <label className="flex items-center gap-2 text-sm text-ink-800">
                <input
                  type="checkbox"
                  className="size-4 rounded border-ink-300"
                  checked={ticked.has(host.id)}
                  disabled={!canWrite || save.isPending}
                  onChange={(event) => toggle(host.id, event.target.checked)}
                />
                <span className="font-medium">{host.name}</span>{" "}
                <span className="text-xs text-ink-500">({host.scheduler})</span>
              </label>
            </li>
          ))}
        </ul>
      )}
      {canWrite && hosts.isSuccess && hosts.data.hosts.length > 0 ? (
        <div className="mt-3 flex items-center gap-3">
          <Button
            size="sm"
            variant="secondary"
            pending={save.isPending}
            onClick={() => save.mutate(hostIdsToSave(ticked, hosts.data.hosts))}
          >
            Save hosts
          </Button>
          {save.isSuccess ? (
            <span className="text-xs text-ink-500" role="status">
              Saved.
            </span>
          ) : null}
        </div>
      ) : null}
      {save.error ? (
        <p id={errorId} role="alert" className="mt-2 text-sm font-medium text-ember-700">
          {problemOf(save.error)}
        </p>
      ) : null}
    </fieldset>
  );
}
