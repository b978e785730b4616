import { type CreateTargetRequest, createTargetRequestSchema } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { type FormEvent, useState } from "react";
import { Link } from "react-router-dom";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input, Textarea } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { hasStatus } from "@/lib/api-error";
import { describeError } from "@/lib/describe-error";
import type { FieldErrors } from "@/lib/field-errors";
import { readTextFields, validateWith, visibleFieldErrors } from "@/lib/form-errors";
import { paths } from "@/lib/paths";
import { createTarget } from "../api/target-commands";
import { targetQueries } from "../api/target-queries";

const XYZ_EXAMPLE =
  "3\nwater, experimental geometry\nO  0.000000  0.000000  0.000000\nH  0.757220  0.000000  0.586514\nH -0.757220  0.000000  0.586514";

/** Whole numbers typed into a field; empty stays empty so the schema's default or "left out" applies. */
const wholeNumber = (text: string | undefined) => (text?.trim() ? Number(text.trim()) : undefined);

/**
 * Enters a target from the text of an XYZ file. The server reads the file and answers a mistake with the
 * line at fault, shown beside the text.
 */
export function AddTargetForm({ groupId }: { groupId: string }) {
  const queryClient = useQueryClient();
  const [clientErrors, setClientErrors] = useState<FieldErrors | null>(null);
  const create = useMutation({
    mutationFn: (request: CreateTargetRequest) => createTarget(groupId, request),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: targetQueries.all }),
  });
  const visible = visibleFieldErrors(clientErrors, create.error);
  // A 422 naming no field is about the XYZ text (the server reads it line by line).
  const xyzError =
    visible.errors.xyz ??
    (visible.unplaced && hasStatus(create.error, 422) ? create.error?.message : undefined);
  const otherError = visible.unplaced && !hasStatus(create.error, 422) ? create.error : null;

  function handleSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    const fields = readTextFields(form);
    const checked = validateWith(createTargetRequestSchema, {
      name: fields.name ?? "",
      xyz: fields.xyz ?? "",
      charge: wholeNumber(fields.charge),
      multiplicity: wholeNumber(fields.multiplicity),
    });
    if (!checked.ok) {
      create.reset();
      setClientErrors(checked.errors);
      return;
    }
    setClientErrors(null);
    create.mutate(checked.data, { onSuccess: () => form.reset() });
  }

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label="Add a target from XYZ"
      className="flex flex-col gap-4"
    >
      <div className="grid gap-4 sm:grid-cols-[minmax(0,1fr)_8rem_8rem]">
        <Field label="Name" error={visible.errors.name}>
          {(control) => <Input {...control} name="name" autoComplete="off" placeholder="Water" />}
        </Field>
        <Field label="Charge" error={visible.errors.charge}>
          {(control) => <Input {...control} name="charge" inputMode="numeric" defaultValue="0" />}
        </Field>
        <Field label="Multiplicity" error={visible.errors.multiplicity} hint="Empty: the lowest possible">
          {(control) => <Input {...control} name="multiplicity" inputMode="numeric" />}
        </Field>
      </div>
      <Field
        label="XYZ"
        error={xyzError}
        hint="Atom count, a comment line, then one atom per line: element (or element@mass number for an isotope) and x, y, z in Å."
      >
        {(control) => (
          <Textarea
            {...control}
            name="xyz"
            rows={8}
            spellCheck={false}
            className="font-mono text-xs"
            placeholder={XYZ_EXAMPLE}
          />
        )}
      </Field>
      {otherError ? <Notice tone="error">{describeError(otherError).message}</Notice> : null}
      {create.isSuccess ? (
        <Notice tone="success" onDismiss={() => create.reset()}>
          Target{" "}
          <Link to={paths.target(groupId, create.data.id)} className="font-medium underline">
            {create.data.name}
          </Link>{" "}
          entered: {create.data.formula}, point group {create.data.pointGroup}.
        </Notice>
      ) : null}
      <div>
        <Button type="submit" pending={create.isPending}>
          Add target
        </Button>
      </div>
    </form>
  );
}
