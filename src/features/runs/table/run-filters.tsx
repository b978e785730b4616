import { type RunState, runStateSchema } from "@shared/schemas";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { DEFAULT_VIEW, type RunListView } from "./run-list-params";

/** A choice of a filter: the id the API filters by and the name people know it by. */
export type FilterOption = { id: string; name: string };
export type RunFilterOptions = {
  targets: FilterOption[];
  recipes: FilterOption[];
  hosts: FilterOption[];
  submitters: FilterOption[];
};

type Props = {
  view: RunListView;
  options: RunFilterOptions;
  /** A changed filter; the page goes back to the first. */
  onChange: (changes: Partial<RunListView>) => void;
};

const selects = [
  { key: "targetId", label: "Target", options: "targets" },
  { key: "recipeId", label: "Recipe", options: "recipes" },
  { key: "hostId", label: "Host", options: "hosts" },
  { key: "submittedById", label: "Submitted by", options: "submitters" },
] as const;

export const hasFilters = (view: RunListView) =>
  view.state.length > 0 ||
  Boolean(
    view.targetId || view.recipeId || view.hostId || view.submittedById || view.createdFrom || view.createdTo,
  );

/** The list's filters: states (several), one target, recipe, host or submitter, and creation dates. */
export function RunFilters({ view, options, onChange }: Props) {
  const toggleState = (state: RunState, on: boolean) =>
    onChange({
      state: on
        ? runStateSchema.options.filter((s) => s === state || view.state.includes(s))
        : view.state.filter((s) => s !== state),
    });
  const dateValue = (value: string | undefined) => value?.slice(0, 10) ?? "";
  return (
    <section aria-label="Filters" className="mb-4 rounded-xl border border-ink-100 bg-white p-4">
      <fieldset className="mb-3">
        <legend className="mb-1.5 text-sm font-medium text-ink-800">State</legend>
        <div className="flex flex-wrap gap-1.5">
          {runStateSchema.options.map((state) => (
            <label
              key={state}
              className="inline-flex cursor-pointer items-center gap-1.5 rounded-md border border-ink-200 px-2 py-1 text-xs text-ink-700 has-[:checked]:border-flux-500 has-[:checked]:bg-flux-50 has-[:checked]:text-flux-900"
            >
              <input
                type="checkbox"
                className="accent-flux-700"
                checked={view.state.includes(state)}
                onChange={(event) => toggleState(state, event.target.checked)}
              />
              {state}
            </label>
          ))}
        </div>
      </fieldset>
      <div className="grid grid-cols-2 gap-3 md:grid-cols-3 xl:grid-cols-6">
        {selects.map(({ key, label, options: list }) => (
          <Field key={key} label={label}>
            {(control) => (
              <Select
                {...control}
                controlSize="sm"
                value={view[key] ?? ""}
                onChange={(event) => onChange({ [key]: event.target.value || undefined })}
              >
                <option value="">Any</option>
                {options[list].map((option) => (
                  <option key={option.id} value={option.id}>
                    {option.name}
                  </option>
                ))}
                {/* A value from a shared link that the lists no longer hold stays visible. */}
                {view[key] && !options[list].some((option) => option.id === view[key]) ? (
                  <option value={view[key]}>Unknown ({view[key]?.slice(0, 8)}…)</option>
                ) : null}
              </Select>
            )}
          </Field>
        ))}
        <Field label="Submitted from (UTC)" hint="Whole day, included.">
          {(control) => (
            <Input
              {...control}
              type="date"
              className="h-8"
              value={dateValue(view.createdFrom)}
              max={dateValue(view.createdTo) || undefined}
              onChange={(event) => onChange({ createdFrom: event.target.value || undefined })}
            />
          )}
        </Field>
        <Field label="Submitted to (UTC)" hint="Whole day, included.">
          {(control) => (
            <Input
              {...control}
              type="date"
              className="h-8"
              value={dateValue(view.createdTo)}
              min={dateValue(view.createdFrom) || undefined}
              onChange={(event) => onChange({ createdTo: event.target.value || undefined })}
            />
          )}
        </Field>
      </div>
      {hasFilters(view) ? (
        <div className="mt-3 flex justify-end">
          <Button
            size="sm"
            variant="ghost"
            onClick={() =>
              onChange({
                state: DEFAULT_VIEW.state,
                targetId: undefined,
                recipeId: undefined,
                hostId: undefined,
                submittedById: undefined,
                createdFrom: undefined,
                createdTo: undefined,
              })
            }
          >
            Clear filters
          </Button>
        </div>
      ) : null}
    </section>
  );
}
