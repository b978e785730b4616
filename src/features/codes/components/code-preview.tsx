import type { Code, CodePreview as CodePreviewResult } from "@shared/schemas";
import { useMutation, useQuery } from "@tanstack/react-query";
import { type KeyboardEvent, useId, useMemo, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { Select } from "@/components/ui/select";
import { isApiRequestError } from "@/lib/api-error";
import { cn } from "@/lib/cn";
import { previewCode } from "../api/code-commands";
import { previewTargetQueries } from "../api/code-queries";
import { type ParameterRow, parameterRows } from "../lib/parameter-rows";

/** A parameter's value as the form holds it: text for everything, read back per type on submit. */
function initialText(row: ParameterRow): string {
  if (!row.hasDefault) return "";
  return typeof row.default === "string" ? row.default : JSON.stringify(row.default);
}

/** Reads one field back: numbers as numbers, booleans as booleans, objects and arrays as JSON. */
function readValue(row: ParameterRow, text: string): { value?: unknown; error?: string } {
  if (text.trim() === "") return {};
  if (row.type === "number" || row.type === "integer") {
    const value = Number(text);
    return Number.isFinite(value) ? { value } : { error: "Give a number." };
  }
  if (row.type === "boolean") return { value: text === "true" };
  if (row.type === "string") return { value: text };
  try {
    return { value: JSON.parse(text) };
  } catch {
    // An enum of strings or an untyped parameter: take the text as a string.
    return row.allowed?.every((v) => typeof v === "string") || row.type === "any" || row.type === "enum"
      ? { value: text }
      : { error: "Give the value as JSON." };
  }
}

function detailsOf(error: unknown): { path: string; message: string }[] {
  if (!isApiRequestError(error) || !Array.isArray(error.details)) return [];
  return error.details.filter(
    (d): d is { path: string; message: string } =>
      d && typeof d.path === "string" && typeof d.message === "string",
  );
}

const formatBytes = (bytes: number) =>
  bytes < 1024 ? `${bytes} B` : `${(bytes / 1024).toFixed(bytes < 10 * 1024 ? 1 : 0)} KiB`;

/** Rendered files in tabs (arrow keys move between them), each a read-only monospace view. */
function RenderedFiles({ preview }: { preview: CodePreviewResult }) {
  const [active, setActive] = useState(0);
  const baseId = useId();
  const tabs = useRef<(HTMLButtonElement | null)[]>([]);
  const files = preview.files;
  if (files.length === 0) return <Notice>This code has no input templates: nothing to render.</Notice>;
  const current = files[Math.min(active, files.length - 1)]!;
  const onKeyDown = (event: KeyboardEvent) => {
    const step = event.key === "ArrowRight" ? 1 : event.key === "ArrowLeft" ? -1 : 0;
    if (!step) return;
    event.preventDefault();
    const next = (active + step + files.length) % files.length;
    setActive(next);
    tabs.current[next]?.focus();
  };
  return (
    <div className="flex flex-col gap-2">
      <div
        role="tablist"
        aria-label="Rendered input files"
        className="flex flex-wrap gap-1 border-b border-ink-100"
      >
        {files.map((file, index) => (
          <button
            key={file.fileName}
            ref={(node) => {
              tabs.current[index] = node;
            }}
            type="button"
            role="tab"
            id={`${baseId}-tab-${index}`}
            aria-selected={index === active}
            aria-controls={`${baseId}-panel`}
            tabIndex={index === active ? 0 : -1}
            onClick={() => setActive(index)}
            onKeyDown={onKeyDown}
            className={cn(
              "-mb-px border-b-2 px-3 py-1.5 font-mono text-xs",
              index === active
                ? "border-flux-700 text-ink-900"
                : "border-transparent text-ink-500 hover:text-ink-800",
            )}
          >
            {file.fileName}
          </button>
        ))}
      </div>
      <div id={`${baseId}-panel`} role="tabpanel" aria-labelledby={`${baseId}-tab-${active}`}>
        <p className="mb-1 text-xs text-ink-500">
          {formatBytes(current.sizeBytes)}
          {current.truncated ? " — longer than the preview shows; the run gets the whole file" : ""}
        </p>
        <pre className="max-h-96 overflow-auto rounded-lg bg-ink-950 p-3 font-mono text-xs leading-5 text-ink-50">
          {current.text}
        </pre>
      </div>
      <p className="text-xs text-ink-600">
        Arguments:{" "}
        {preview.arguments.length === 0 ? (
          "none"
        ) : (
          <code className="font-mono">{preview.arguments.map((a) => JSON.stringify(a)).join(" ")}</code>
        )}
      </p>
    </div>
  );
}

/**
 * Renders the code's input files on the server with the renderer runs use, for a target of the group
 * and parameter values (the schema's defaults filled in to start with).
 */
export function CodePreview({ groupId, code }: { groupId: string; code: Code }) {
  const rows = useMemo(() => parameterRows(code.definition.parameters), [code.definition.parameters]);
  const targets = useQuery(previewTargetQueries.list(groupId));
  const [targetId, setTargetId] = useState("");
  const [values, setValues] = useState<Record<string, string>>(() =>
    Object.fromEntries(rows.map((row) => [row.name, initialText(row)])),
  );
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const preview = useMutation({
    mutationFn: (parameters: Record<string, unknown>) =>
      previewCode(code.id, { targetId: targetId || null, parameters }),
  });

  const serverErrors = Object.fromEntries(
    detailsOf(preview.error).map((d) => [d.path.replace(/^parameters\.?/, ""), d.message]),
  );
  const targetError = serverErrors.targetId;
  const errorFor = (name: string) => localErrors[name] ?? serverErrors[name];

  const submit = () => {
    const parameters: Record<string, unknown> = {};
    const problems: Record<string, string> = {};
    for (const row of rows) {
      const read = readValue(row, values[row.name] ?? "");
      if (read.error) problems[row.name] = read.error;
      else if (read.value !== undefined) parameters[row.name] = read.value;
    }
    setLocalErrors(problems);
    if (Object.keys(problems).length === 0) preview.mutate(parameters);
  };

  const targetList = targets.data?.targets ?? [];
  const targetOptions = targetList.flatMap((target) => [
    { id: target.id, label: `${target.name} (v${target.latestVersion})` },
    ...target.isotopologues.map((iso) => ({
      id: iso.id,
      label: `↳ ${iso.name} (isotopologue, v${iso.latestVersion})`,
    })),
  ]);

  return (
    <section aria-labelledby={`preview-${code.id}`} className="flex flex-col gap-4">
      <h3 id={`preview-${code.id}`} className="text-sm font-semibold text-ink-900">
        Template preview
      </h3>
      <form
        className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3"
        onSubmit={(event) => {
          event.preventDefault();
          submit();
        }}
      >
        <Field
          label="Target"
          hint={targets.isError ? "The targets could not be loaded." : "What `target` is in the templates."}
          error={targetError}
        >
          {(control) => (
            <Select {...control} value={targetId} onChange={(event) => setTargetId(event.target.value)}>
              <option value="">No target</option>
              {targetOptions.map((option) => (
                <option key={option.id} value={option.id}>
                  {option.label}
                </option>
              ))}
            </Select>
          )}
        </Field>
        {rows.map((row) => (
          <Field
            key={row.name}
            label={`${row.name}${row.unit ? ` (${row.unit})` : ""}`}
            hint={[row.type, row.required ? "required" : null, row.description].filter(Boolean).join(" · ")}
            error={errorFor(row.name)}
          >
            {(control) =>
              row.type === "boolean" ? (
                <Select
                  {...control}
                  value={values[row.name] ?? ""}
                  onChange={(event) => setValues({ ...values, [row.name]: event.target.value })}
                >
                  <option value="">(not given)</option>
                  <option value="true">true</option>
                  <option value="false">false</option>
                </Select>
              ) : row.allowed ? (
                <Select
                  {...control}
                  value={values[row.name] ?? ""}
                  onChange={(event) => setValues({ ...values, [row.name]: event.target.value })}
                >
                  <option value="">(not given)</option>
                  {row.allowed.map((value) => {
                    const text = typeof value === "string" ? value : JSON.stringify(value);
                    return (
                      <option key={text} value={text}>
                        {text}
                      </option>
                    );
                  })}
                </Select>
              ) : (
                <Input
                  {...control}
                  className="font-mono"
                  inputMode={row.type === "number" || row.type === "integer" ? "decimal" : undefined}
                  value={values[row.name] ?? ""}
                  onChange={(event) => setValues({ ...values, [row.name]: event.target.value })}
                />
              )
            }
          </Field>
        ))}
        <div className="flex items-end">
          <Button type="submit" variant="secondary" pending={preview.isPending}>
            Render input files
          </Button>
        </div>
      </form>
      {preview.isError ? (
        <Notice tone="error" title="The files could not be rendered">
          {preview.error.message}
        </Notice>
      ) : null}
      {preview.data && !preview.isError ? (
        <div className="flex flex-col gap-2">
          <p className="text-xs text-ink-600">
            Rendered for{" "}
            {preview.data.target
              ? `${preview.data.target.name} v${preview.data.target.version}`
              : "no target"}{" "}
            with <code className="font-mono">{JSON.stringify(preview.data.parameters)}</code>
          </p>
          <RenderedFiles preview={preview.data} />
        </div>
      ) : null}
    </section>
  );
}
