import { type CreateTargetRequest, createTargetRequestSchema } from "@shared/schemas";
import { useMutation, useQueryClient } from "@tanstack/react-query";
import { type DragEvent, type FormEvent, useState } from "react";
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
import { createTarget, uploadTarget } from "../api/target-commands";
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
  const [file, setFile] = useState<File | null>(null);
  const create = useMutation({
    mutationFn: (
      request: CreateTargetRequest | { upload: File; name: string; charge?: number; multiplicity?: number },
    ) =>
      "upload" in request ? uploadTarget(groupId, request, request.upload) : createTarget(groupId, request),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: targetQueries.all }),
  });
  const visible = visibleFieldErrors(clientErrors, create.error);
  // A 422 naming no field is about the XYZ text (the server reads it line by line).
  const xyzError =
    visible.errors.xyz ??
    (visible.unplaced && hasStatus(create.error, 422) ? create.error?.message : undefined);
  // An upload's refusals (413 too large, 422 naming the line) belong beside the file.
  const fileError =
    file && create.error && (hasStatus(create.error, 413) || hasStatus(create.error, 422))
      ? (visible.errors.file ?? visible.errors.xyz ?? create.error.message)
      : undefined;
  const otherError =
    visible.unplaced && !hasStatus(create.error, 422) && !(file && hasStatus(create.error, 413))
      ? create.error
      : null;

  function onDrop(event: DragEvent<HTMLFormElement>) {
    event.preventDefault();
    const dropped = event.dataTransfer.files[0];
    if (dropped) {
      create.reset();
      setFile(dropped);
    }
  }

  function handleSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    const fields = readTextFields(form);
    const checked = validateWith(createTargetRequestSchema, {
      name: fields.name ?? "",
      // With a file chosen the server reads the file; the text only has to pass the check here.
      xyz: file ? "file" : (fields.xyz ?? ""),
      charge: wholeNumber(fields.charge),
      multiplicity: wholeNumber(fields.multiplicity),
    });
    if (!checked.ok) {
      create.reset();
      setClientErrors(checked.errors);
      return;
    }
    setClientErrors(null);
    const done = {
      onSuccess: () => {
        form.reset();
        setFile(null);
      },
    };
    if (file) {
      const { name, charge, multiplicity } = checked.data;
      create.mutate({ upload: file, name, charge, multiplicity }, done);
    } else {
      create.mutate(checked.data, done);
    }
  }

  return (
    <form
      onSubmit={handleSubmit}
      onDragOver={(event) => event.preventDefault()}
      onDrop={onDrop}
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
      <Field
        label="XYZ file"
        error={fileError}
        hint={
          file
            ? `${file.name} (${file.size} bytes) will be uploaded instead of the text above.`
            : "Or drop an XYZ file onto this form, or choose one (at most 256 KiB): Sigmaflow reads it on the server."
        }
      >
        {(control) => (
          <Input
            {...control}
            type="file"
            accept=".xyz,text/plain,chemical/x-xyz"
            className="h-auto py-1.5"
            onChange={(event) => {
              create.reset();
              setFile(event.target.files?.[0] ?? null);
            }}
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
