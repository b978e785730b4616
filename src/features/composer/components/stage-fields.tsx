import { type Control, Controller, type UseFormRegister } from "react-hook-form";
import { Field } from "@/components/ui/field";
import { Input, Textarea } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import type { StageSchema } from "../api/composer-queries";
import { errorSentence, hintOfField, labelOfField } from "../field-text";
import type { SchemaField } from "../parameter-fields";
import { EnergyGridBuilder } from "./energy-grid-builder";

export type ComposerValues = {
  name: string;
  recipeId: string;
  hostId: string;
  targetId: string;
  /** Text as typed; empty means the codes' defaults. */
  cores: string;
  wallTimeMinutes: string;
  parameters: Record<string, Record<string, unknown>>;
};

const labelOf = labelOfField;
const hintOf = hintOfField;

type Props = {
  stage: StageSchema;
  index: number;
  fields: SchemaField[];
  register: UseFormRegister<ComposerValues>;
  control: Control<ComposerValues>;
  /** The check's message for a field, once it is worth showing (see the composer). */
  errorOf: (name: `parameters.${string}.${string}`) => string | undefined;
  /** Messages the server's check gave, by parameter name. */
  serverErrors: Record<string, string | undefined>;
};

/** One stage's parameters, drawn from its code's JSON Schema, each error beside its field. */
export function StageFields({ stage, index, fields, register, control, errorOf, serverErrors }: Props) {
  return (
    <fieldset className="space-y-3 rounded-xl border border-ink-200 bg-white p-4">
      <legend className="px-1 text-sm font-semibold text-ink-900">
        Stage {index} · {stage.stage}{" "}
        <span className="font-normal text-ink-500">
          ({stage.codeName} {stage.codeVersion})
        </span>
      </legend>
      {fields.length === 0 ? <p className="text-sm text-ink-500">This code takes no parameters.</p> : null}
      <div className="grid gap-3 sm:grid-cols-2">
        {fields.map((field) => {
          const name = `parameters.${stage.stage}.${field.name}` as const;
          const message = errorOf(name) ?? serverErrors[field.name];
          const error = message ? errorSentence(message, field.unit) : undefined;
          const hint = hintOf(field);
          if (field.kind.type === "energy-grid") {
            const { maxItems } = field.kind;
            return (
              <div key={field.name} className="sm:col-span-2">
                <Controller
                  control={control}
                  name={name}
                  render={({ field: controlled }) => (
                    <Field label={labelOf(field)} hint={hint} error={error}>
                      {(wiring) => (
                        <div id={wiring.id} tabIndex={-1}>
                          <EnergyGridBuilder
                            label={field.label}
                            value={Array.isArray(controlled.value) ? (controlled.value as number[]) : []}
                            maxItems={maxItems}
                            describedBy={wiring["aria-describedby"]}
                            onFill={(energiesEv) => controlled.onChange(energiesEv)}
                          />
                        </div>
                      )}
                    </Field>
                  )}
                />
              </div>
            );
          }
          if (field.kind.type === "boolean") {
            return (
              <Field key={field.name} label={labelOf(field)} hint={hint} error={error}>
                {(wiring) => (
                  <input type="checkbox" className="size-4 accent-flux-700" {...wiring} {...register(name)} />
                )}
              </Field>
            );
          }
          if (field.kind.type === "enum") {
            const { options } = field.kind;
            return (
              <Field key={field.name} label={labelOf(field)} hint={hint} error={error}>
                {(wiring) => (
                  <Select {...wiring} {...register(name)}>
                    {field.required ? null : <option value="">(code default)</option>}
                    {options.map((option) => (
                      <option key={String(option)} value={String(option)}>
                        {String(option)}
                      </option>
                    ))}
                  </Select>
                )}
              </Field>
            );
          }
          if (field.kind.type === "json") {
            return (
              <Field
                key={field.name}
                label={labelOf(field)}
                hint={hint ? `${hint} Written as JSON.` : "Written as JSON."}
                error={error}
                className="sm:col-span-2"
              >
                {(wiring) => (
                  <Textarea className="font-mono" spellCheck={false} {...wiring} {...register(name)} />
                )}
              </Field>
            );
          }
          return (
            <Field key={field.name} label={labelOf(field)} hint={hint} error={error}>
              {(wiring) => (
                <Input
                  inputMode={field.kind.type === "number" ? "decimal" : undefined}
                  {...wiring}
                  {...register(name)}
                />
              )}
            </Field>
          );
        })}
      </div>
    </fieldset>
  );
}
