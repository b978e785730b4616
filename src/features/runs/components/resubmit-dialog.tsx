import type { RunDetail, RunSpecChanges } from "@shared/schemas";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { type FormEvent, useId, useRef, useState } from "react";
import { createPortal } from "react-dom";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { Select } from "@/components/ui/select";
import { Spinner } from "@/components/ui/spinner";
import { useModalFocus } from "@/components/ui/use-modal-focus";
import { describeError } from "@/lib/describe-error";
import { fieldErrorsFromError } from "@/lib/field-errors";
import { hostUnfitReason, stageNotInstalledOn } from "@/lib/host-fit";
import { resubmitRun } from "../api/run-commands";
import { runQueries } from "../api/run-queries";
import { initialText, type ParameterField, parameterFields, readField } from "../parameter-fields";

type ResubmittableRun = Pick<RunDetail, "id" | "groupId" | "name" | "recipeId" | "spec">;

function hint(field: ParameterField): string | undefined {
  const parts: string[] = [];
  if (field.description) parts.push(field.description);
  if (!field.used) {
    parts.push(
      field.schemaDefault === undefined
        ? "Not set by this run; leave empty to keep the code's default."
        : `Not set by this run; leave empty for the code's default (${JSON.stringify(field.schemaDefault)}).`,
    );
  } else if (field.kind.type === "json") {
    parts.push('JSON: text in double quotes ("aug-cc-pvdz"), numbers and true/false bare.');
  }
  return parts.length > 0 ? parts.join(" ") : undefined;
}

function ParameterControl({
  field,
  control,
}: {
  field: ParameterField;
  control: { id: string; "aria-describedby"?: string; "aria-invalid"?: true };
}) {
  const name = field.key;
  const defaultValue = initialText(field);
  if (field.kind.type === "enum" || field.kind.type === "boolean") {
    const options = field.kind.type === "boolean" ? [true, false] : field.kind.options;
    return (
      <Select {...control} name={name} defaultValue={defaultValue}>
        {field.used ? null : <option value="">Code default</option>}
        {options.map((option) => (
          <option key={JSON.stringify(option)} value={JSON.stringify(option)}>
            {typeof option === "string" ? option : JSON.stringify(option)}
          </option>
        ))}
      </Select>
    );
  }
  return (
    <Input
      {...control}
      name={name}
      defaultValue={defaultValue}
      autoComplete="off"
      spellCheck={false}
      inputMode={field.kind.type === "number" ? "decimal" : undefined}
      className="font-mono"
    />
  );
}

/** The server's 422 message for a field: its issues name `spec.parameters.<stage>.<parameter>`. */
function serverFieldError(errors: Record<string, string | undefined>, field: ParameterField) {
  const suffix = `parameters.${field.stage}.${field.name}`;
  const key = Object.keys(errors).find((path) => path.endsWith(suffix) || path.includes(`${suffix}.`));
  return key ? errors[key] : undefined;
}

/**
 * A form over a finished run's parameters, stage by stage, that resubmits it with what was changed: only
 * changed values are sent (a merge into the original's spec), so a new version of a code's defaults still
 * applies to everything left alone.
 */
export function ResubmitDialog({
  run,
  onClose,
  onResubmitted,
}: {
  run: ResubmittableRun;
  onClose: () => void;
  onResubmitted?: (id: string) => void;
}) {
  const titleId = useId();
  const panelRef = useRef<HTMLDivElement>(null);
  const queryClient = useQueryClient();
  const schemas = useQuery(runQueries.stageParameters(run.recipeId));
  const hosts = useQuery(runQueries.hosts(run.groupId));
  const stages = parameterFields(run.spec.parameters, schemas.data);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [formMessage, setFormMessage] = useState<string | null>(null);
  const resubmit = useMutation({
    mutationFn: (changes: RunSpecChanges) => resubmitRun(run.id, changes),
    onSuccess: (created) => {
      void queryClient.invalidateQueries({ queryKey: runQueries.all });
      onResubmitted?.(created.id);
      onClose();
    },
  });
  const serverErrors = fieldErrorsFromError(resubmit.error);

  const handleKeyDown = useModalFocus({
    panelRef,
    initialFocus: () => panelRef.current?.querySelector<HTMLElement>("input, select"),
    pending: resubmit.isPending,
    onClose,
  });

  function handleSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const errors: Record<string, string> = {};
    const parameters: Record<string, Record<string, unknown>> = {};
    for (const field of stages.flatMap((stage) => stage.fields)) {
      const text = form.get(field.key);
      const reading = readField(field, typeof text === "string" ? text : "");
      if ("error" in reading) errors[field.key] = reading.error;
      else if (reading.change)
        parameters[field.stage] = { ...parameters[field.stage], [field.name]: reading.value };
    }
    const hostId = String(form.get("hostId") ?? run.spec.hostId);
    const unfit = schemas.data ? stageNotInstalledOn(schemas.data, hostId) : undefined;
    if (unfit) errors.hostId = `The code of stage ${unfit.stage} is not installed on this host.`;
    const name = String(form.get("name") ?? "").trim();
    if (name === "") errors.name = "Give the new run a name.";
    else if (name.length > 120) errors.name = "Keep the name to 120 characters.";
    setFieldErrors(errors);
    resubmit.reset();
    if (Object.keys(errors).length > 0) {
      setFormMessage(null);
      return;
    }
    const changes: RunSpecChanges = {};
    if (name !== run.name) changes.name = name;
    if (hostId !== run.spec.hostId) changes.hostId = hostId;
    if (Object.keys(parameters).length > 0) changes.parameters = parameters;
    if (Object.keys(changes).length === 0) {
      setFormMessage("Nothing was changed. Change a value, or use Resubmit to run it again as it was.");
      return;
    }
    setFormMessage(null);
    resubmit.mutate(changes);
  }

  const unplacedServerError =
    resubmit.error &&
    !stages.some((stage) => stage.fields.some((field) => serverFieldError(serverErrors, field))) &&
    !serverErrors["changes.name"] &&
    !serverErrors["spec.hostId"];

  return createPortal(
    <div className="fixed inset-0 z-50 flex items-center justify-center p-4">
      <div
        aria-hidden="true"
        className="absolute inset-0 bg-ink-950/50 backdrop-blur-[2px]"
        onClick={resubmit.isPending ? undefined : onClose}
      />
      <div
        ref={panelRef}
        role="dialog"
        aria-modal="true"
        aria-labelledby={titleId}
        onKeyDown={handleKeyDown}
        className="relative max-h-[90vh] w-full max-w-xl overflow-y-auto rounded-2xl border border-ink-100 bg-white p-6 shadow-xl"
      >
        <h2 id={titleId} className="text-lg font-semibold text-ink-950">
          Resubmit with changes
        </h2>
        <p className="mt-1 text-sm text-ink-600">
          A new run from this run's specification. Only the values you change are sent; everything else stays
          as this run had it.
        </p>
        <form
          onSubmit={handleSubmit}
          noValidate
          aria-label="Changes for the new run"
          className="mt-4 flex flex-col gap-5"
        >
          <Field label="Name of the new run" error={fieldErrors.name ?? serverErrors["changes.name"]}>
            {(control) => <Input {...control} name="name" defaultValue={run.name} autoComplete="off" />}
          </Field>
          <Field
            label="Host"
            hint="Where the new run goes; a host without a stage's code cannot be chosen."
            error={fieldErrors.hostId ?? serverErrors["spec.hostId"]}
          >
            {(control) => (
              <Select {...control} name="hostId" defaultValue={run.spec.hostId}>
                {(hosts.data?.hosts ?? []).some((host) => host.id === run.spec.hostId) ? null : (
                  <option value={run.spec.hostId}>This run's host</option>
                )}
                {(hosts.data?.hosts ?? []).map((host) => {
                  const reason =
                    host.id === run.spec.hostId ? undefined : hostUnfitReason(host, schemas.data ?? []);
                  return (
                    <option key={host.id} value={host.id} disabled={reason !== undefined}>
                      {host.name} ({host.scheduler}){reason ? ` — ${reason}` : ""}
                    </option>
                  );
                })}
              </Select>
            )}
          </Field>
          {schemas.isPending ? <Spinner label="Reading the parameters the codes declare…" /> : null}
          {schemas.isError ? (
            <Notice tone="info">
              The codes' parameter declarations could not be read; the values this run used are edited as
              JSON.
            </Notice>
          ) : null}
          {schemas.isPending
            ? null
            : stages.map((stage) => (
                <fieldset
                  key={stage.stage}
                  className="flex flex-col gap-3 rounded-xl border border-ink-100 p-4"
                >
                  <legend className="px-1 text-sm font-semibold text-ink-900">
                    Stage {stage.stage}
                    {stage.code ? <span className="font-normal text-ink-500"> ({stage.code})</span> : null}
                  </legend>
                  {stage.fields.length === 0 ? (
                    <p className="text-sm text-ink-500">This stage takes no parameters.</p>
                  ) : (
                    stage.fields.map((field) => (
                      <Field
                        key={field.key}
                        label={field.name}
                        hint={hint(field)}
                        error={fieldErrors[field.key] ?? serverFieldError(serverErrors, field)}
                      >
                        {(control) => <ParameterControl field={field} control={control} />}
                      </Field>
                    ))
                  )}
                </fieldset>
              ))}
          {formMessage ? <Notice tone="info">{formMessage}</Notice> : null}
          {unplacedServerError ? <Notice tone="error">{describeError(resubmit.error).message}</Notice> : null}
          <div className="flex justify-end gap-2">
            <Button variant="secondary" onClick={onClose} disabled={resubmit.isPending}>
              Cancel
            </Button>
            <Button type="submit" pending={resubmit.isPending} disabled={schemas.isPending}>
              Resubmit with these changes
            </Button>
          </div>
        </form>
      </div>
    </div>,
    document.body,
  );
}
