import {
  type OnDuplicate,
  type RunSpecRequest,
  type RunSummary,
  runResourcesSchema,
  runSpecSchema,
} from "@shared/schemas";
import type { ExtraFile } from "@shared/schemas/run-extra-files";
import { useMutation, useQuery } from "@tanstack/react-query";
import { Fragment, useEffect, useMemo, useRef, useState } from "react";
import { type FieldErrors, type Resolver, useForm, useWatch } from "react-hook-form";
import { Button } from "@/components/ui/button";
import { ErrorState } from "@/components/ui/error-state";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import { isApiRequestError } from "@/lib/api-error";
import { fieldErrorsFromDetails } from "@/lib/field-errors";
import { formulaText } from "@/lib/formula";
import { hostUnfitReason, stageNotInstalledOn } from "@/lib/host-fit";
import { composerQueries, type StageSchema, submitRun } from "../api/composer-queries";
import { defaultValuesOf, fieldsOfSchema, parametersOf, type SchemaField } from "../parameter-fields";
import { checkParameters } from "../parameter-resolver";
import { ExtraFilesField } from "./extra-files-field";
import { CostSummary, RenderedFiles, ReuseOffer } from "./run-preview-panel";
import { type ComposerValues, StageFields } from "./stage-fields";

type Stage = StageSchema & { fields: SchemaField[] };

const PREVIEW_DELAY_MS = 400;

function checkCount(schema: typeof runResourcesSchema.shape.cores, text: string, what: string) {
  if (text.trim() === "") return undefined;
  const parsed = schema.safeParse(Number(text));
  return parsed.success ? undefined : `${what}: ${parsed.error.issues[0]?.message ?? "invalid"}`;
}

/** The run spec the form's values stand for (what both the preview and the submission send). */
function specOf(values: ComposerValues, stages: Stage[], extraFiles: ExtraFile[]): RunSpecRequest {
  const resources: RunSpecRequest["resources"] = {};
  if (values.cores.trim()) resources.cores = Number(values.cores);
  if (values.wallTimeMinutes.trim()) resources.wallTimeMinutes = Number(values.wallTimeMinutes);
  return {
    name: values.name.trim(),
    recipeId: values.recipeId,
    hostId: values.hostId,
    ...(values.targetId ? { targetId: values.targetId } : {}),
    parameters: Object.fromEntries(
      stages.map((stage) => [
        stage.stage,
        parametersOf(stage.fields, values.parameters?.[stage.stage] ?? {}),
      ]),
    ),
    ...(extraFiles.length > 0 ? { extraFiles } : {}),
    resources,
    notifyByEmail: false,
  };
}

function useDebounced<T>(value: T, delayMs: number): T {
  const [debounced, setDebounced] = useState(value);
  useEffect(() => {
    const timer = setTimeout(() => setDebounced(value), delayMs);
    return () => clearTimeout(timer);
  }, [value, delayMs]);
  return debounced;
}

type Props = {
  groupId: string;
  onSubmitted: (run: RunSummary) => void;
  onOpenRun: (runId: string) => void;
};

/**
 * The composer: target, recipe and host, each stage's parameters drawn from its code's JSON Schema,
 * resources, and the server's preview (cost, balance, rendered files, an identical finished run) before
 * anything is submitted.
 */
export function ComposerForm({ groupId, onSubmitted, onOpenRun }: Props) {
  const targets = useQuery(composerQueries.targets(groupId));
  const recipes = useQuery(composerQueries.recipes(groupId));
  const hosts = useQuery(composerQueries.hosts(groupId));
  const stagesRef = useRef<Stage[]>([]);

  const resolver: Resolver<ComposerValues> = async (values) => {
    const errors: FieldErrors<ComposerValues> = {};
    const name = runSpecSchema.shape.name.safeParse(values.name);
    if (!name.success)
      errors.name = { type: "zod", message: "Give the run a name (at most 120 characters)." };
    if (!values.recipeId) errors.recipeId = { type: "required", message: "Choose a recipe." };
    if (!values.hostId) errors.hostId = { type: "required", message: "Choose a host." };
    else {
      const missing = stageNotInstalledOn(stagesRef.current, values.hostId);
      if (missing)
        errors.hostId = {
          type: "validate",
          message: `The code of stage ${missing.stage} is not installed on this host.`,
        };
    }
    const cores = checkCount(runResourcesSchema.shape.cores, values.cores, "Cores");
    if (cores) errors.cores = { type: "zod", message: cores };
    const wall = checkCount(runResourcesSchema.shape.wallTimeMinutes, values.wallTimeMinutes, "Wall time");
    if (wall) errors.wallTimeMinutes = { type: "zod", message: wall };
    const parameterErrors: Record<string, Record<string, { type: string; message: string }>> = {};
    for (const stage of stagesRef.current) {
      const found = checkParameters(
        stage.parameters,
        parametersOf(stage.fields, values.parameters?.[stage.stage] ?? {}),
      );
      if (Object.keys(found).length > 0)
        parameterErrors[stage.stage] = found as Record<string, { type: string; message: string }>;
    }
    if (Object.keys(parameterErrors).length > 0) errors.parameters = parameterErrors as never;
    return Object.keys(errors).length > 0 ? { values: {}, errors } : { values, errors: {} };
  };

  const form = useForm<ComposerValues>({
    mode: "onChange",
    resolver,
    defaultValues: {
      name: "",
      recipeId: "",
      hostId: "",
      targetId: "",
      cores: "",
      wallTimeMinutes: "",
      parameters: {},
    },
  });
  const { register, control, formState, setValue, trigger, handleSubmit, getFieldState } = form;
  // A message shows once its field was changed or left, or after an attempt to submit: a fresh form
  // is not a list of complaints.
  const [attempted, setAttempted] = useState(false);
  const errorOf = (name: Parameters<typeof getFieldState>[0]): string | undefined => {
    const state = getFieldState(name, formState);
    const message = state.error?.message;
    return (attempted || state.isDirty || state.isTouched) && typeof message === "string"
      ? message
      : undefined;
  };
  const recipeId = useWatch({ control, name: "recipeId" });
  const schemas = useQuery({ ...composerQueries.stageSchemas(recipeId), enabled: Boolean(recipeId) });
  const stages = useMemo<Stage[]>(
    () => (schemas.data ?? []).map((stage) => ({ ...stage, fields: fieldsOfSchema(stage.parameters) })),
    [schemas.data],
  );
  const [extraFiles, setExtraFiles] = useState<ExtraFile[]>([]);
  // A recipe's stages start from their codes' defaults, and without extra files.
  useEffect(() => {
    setExtraFiles([]);
    stagesRef.current = recipeId ? stages : [];
    setValue(
      "parameters",
      Object.fromEntries(stages.map((stage) => [stage.stage, defaultValuesOf(stage.fields)])),
    );
    void trigger();
  }, [recipeId, stages, setValue, trigger]);

  const values = useWatch({ control }) as ComposerValues;
  const ready = formState.isValid && stages.length > 0 && stagesRef.current === stages;
  const spec = useMemo(
    () => (ready ? specOf(values, stages, extraFiles) : null),
    [ready, values, stages, extraFiles],
  );
  const debouncedSpec = useDebounced(spec, PREVIEW_DELAY_MS);
  const previewSpec = spec && JSON.stringify(spec) === JSON.stringify(debouncedSpec) ? debouncedSpec : null;
  const preview = useQuery({
    ...composerQueries.preview(groupId, previewSpec ?? (spec as RunSpecRequest)),
    enabled: previewSpec !== null,
  });
  const serverProblem = preview.error && isApiRequestError(preview.error) ? preview.error : null;
  const serverFields = serverProblem?.status === 422 ? fieldErrorsFromDetails(serverProblem.details) : {};
  const serverFor = (path: string) => serverFields[`spec.${path}`];

  const submit = useMutation({
    mutationFn: (input: { spec: RunSpecRequest; onDuplicate: OnDuplicate }) =>
      submitRun(groupId, input.spec, input.onDuplicate),
    onSuccess: onSubmitted,
  });
  const current = preview.data && previewSpec && spec && previewSpec === debouncedSpec ? preview.data : null;
  const canSubmit = Boolean(spec && current && !current.refusal && !submit.isPending);
  const send = (onDuplicate: OnDuplicate) =>
    handleSubmit((valid) => {
      if (!current) return;
      submit.mutate({ spec: specOf(valid, stages, extraFiles), onDuplicate });
    })();

  if (targets.isError) return <ErrorState error={targets.error} />;
  if (recipes.isError) return <ErrorState error={recipes.error} />;
  if (hosts.isError) return <ErrorState error={hosts.error} />;

  return (
    <form
      noValidate
      aria-label="New run"
      className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]"
      onSubmit={(event) => {
        event.preventDefault();
        if (canSubmit && !current?.reusable) void send("ask");
        else {
          setAttempted(true);
          void trigger(undefined, { shouldFocus: true });
        }
      }}
    >
      <div className="space-y-5">
        <section className="grid gap-3 rounded-xl border border-ink-200 bg-white p-4 sm:grid-cols-2">
          <Field label="Run name" error={errorOf("name") ?? serverFor("name")} className="sm:col-span-2">
            {(wiring) => <Input autoComplete="off" {...wiring} {...register("name")} />}
          </Field>
          <Field
            label="Target"
            hint="Its latest version is used and kept with the run."
            error={serverFor("targetId")}
            className="sm:col-span-2"
          >
            {(wiring) => (
              <Select {...wiring} {...register("targetId")}>
                <option value="">No target (the recipe does not read one)</option>
                {(targets.data?.targets ?? []).flatMap((target) => [
                  <option key={target.id} value={target.id}>
                    {target.name} · {formulaText(target.formula)} · {target.pointGroup}
                  </option>,
                  ...target.isotopologues.map((iso) => (
                    <option key={iso.id} value={iso.id}>
                      {"\u2003"}isotopologue {iso.name} · {formulaText(iso.formula)} · {iso.pointGroup}
                    </option>
                  )),
                ])}
              </Select>
            )}
          </Field>
          <Field
            label="Recipe"
            error={errorOf("recipeId") ?? serverFor("recipeId")}
            className="sm:col-span-2"
          >
            {(wiring) => (
              <Select {...wiring} {...register("recipeId")}>
                <option value="">Choose a recipe…</option>
                {(recipes.data?.recipes ?? []).map((recipe) => (
                  <option key={recipe.id} value={recipe.id}>
                    {recipe.name} ({recipe.stages.map((stage) => stage.name).join(" → ")})
                  </option>
                ))}
              </Select>
            )}
          </Field>
          <div className="grid gap-3 sm:col-span-2 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)_minmax(0,1fr)]">
            <Field label="Host" error={errorOf("hostId") ?? serverFor("hostId")}>
              {(wiring) => (
                <Select {...wiring} {...register("hostId")}>
                  <option value="">Choose a host…</option>
                  {(hosts.data?.hosts ?? []).map((host) => {
                    const unfit = hostUnfitReason(host, recipeId ? stages : []);
                    return (
                      <option key={host.id} value={host.id} disabled={unfit !== undefined}>
                        {host.name} ({host.scheduler}){unfit ? ` — ${unfit}` : ""}
                      </option>
                    );
                  })}
                </Select>
              )}
            </Field>
            <Field
              label="Cores"
              hint="Empty: the most any stage's code asks for."
              error={errorOf("cores") ?? serverFor("resources.cores")}
            >
              {(wiring) => <Input inputMode="numeric" {...wiring} {...register("cores")} />}
            </Field>
            <Field
              label="Wall-time limit (min)"
              hint="Empty: the sum of the stages' defaults."
              error={errorOf("wallTimeMinutes") ?? serverFor("resources.wallTimeMinutes")}
            >
              {(wiring) => <Input inputMode="numeric" {...wiring} {...register("wallTimeMinutes")} />}
            </Field>
          </div>
        </section>
        {schemas.isError ? <ErrorState error={schemas.error} /> : null}
        {stages.map((stage, i) => (
          <Fragment key={`${recipeId}:${stage.stage}`}>
            <StageFields
              stage={stage}
              index={i + 1}
              fields={stage.fields}
              register={register}
              control={control}
              errorOf={errorOf}
              serverErrors={Object.fromEntries(
                stage.fields.map((field) => [
                  field.name,
                  serverFor(`parameters.${stage.stage}.${field.name}`),
                ]),
              )}
            />
            <ExtraFilesField
              stage={stage.stage}
              files={extraFiles}
              onChange={setExtraFiles}
              serverErrors={Object.fromEntries(
                extraFiles.map((_, n) => [
                  n,
                  serverFor(`extraFiles.${n}.fileName`) ??
                    serverFor(`extraFiles.${n}.stage`) ??
                    serverFor(`extraFiles.${n}.contentBase64`),
                ]),
              )}
              serverListError={serverFor("extraFiles")}
            />
          </Fragment>
        ))}
      </div>

      <aside className="space-y-4 lg:sticky lg:top-4 lg:self-start" aria-label="Before submitting">
        <section className="space-y-3 rounded-xl border border-ink-200 bg-white p-4">
          <h2 className="text-sm font-semibold text-ink-900">Before submitting</h2>
          {!spec ? (
            <p className="text-sm text-ink-500">
              Fill in the fields; the cost and the rendered files appear here.
            </p>
          ) : serverProblem ? (
            <p className="text-sm font-medium text-ember-700" role="alert">
              {serverProblem.message}
            </p>
          ) : !current ? (
            <p className="text-sm text-ink-500" aria-live="polite">
              Checking with the server…
            </p>
          ) : (
            <CostSummary preview={current} />
          )}
          {current?.reusable ? (
            <ReuseOffer
              reusable={current.reusable}
              pending={submit.isPending}
              onOpen={() => onOpenRun(current.reusable!.id)}
              onReuse={() => void send("reuse")}
              onRunAnyway={() => void send("run")}
              runAnywayDisabled={!canSubmit}
            />
          ) : (
            // Left enabled while fields are wrong: pressing it names them all and moves to the first.
            // It waits only for the server's check of a complete form, or refuses with its reason.
            <Button
              type="submit"
              disabled={spec !== null && !canSubmit}
              pending={submit.isPending}
              className="w-full"
            >
              Submit run
            </Button>
          )}
          {submit.error ? (
            <p className="text-sm font-medium text-ember-700" role="alert">
              {submit.error.message}
            </p>
          ) : null}
        </section>
        {current ? (
          <section className="space-y-2 rounded-xl border border-ink-200 bg-white p-4">
            <h2 className="text-sm font-semibold text-ink-900">Input files and batch script</h2>
            <RenderedFiles preview={current} />
          </section>
        ) : null}
      </aside>
    </form>
  );
}
