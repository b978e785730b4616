import { createGroupRequestSchema } from "@shared/schemas";
import { type FormEvent, useState } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input, Textarea } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { describeError } from "@/lib/describe-error";
import type { FieldErrors } from "@/lib/field-errors";
import { readTextFields, validateWith, visibleFieldErrors } from "@/lib/form-errors";
import { useCreateGroup } from "../hooks/use-create-group";

export function CreateGroupForm() {
  const createGroup = useCreateGroup();
  const [clientErrors, setClientErrors] = useState<FieldErrors | null>(null);
  const { errors, unplaced } = visibleFieldErrors(clientErrors, createGroup.error, "slug");

  function handleSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    const checked = validateWith(createGroupRequestSchema, readTextFields(form));
    if (!checked.ok) {
      createGroup.reset();
      setClientErrors(checked.errors);
      return;
    }
    setClientErrors(null);
    createGroup.mutate(checked.data, { onSuccess: () => form.reset() });
  }

  return (
    <form onSubmit={handleSubmit} noValidate className="flex flex-col gap-4">
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Slug" hint="Short name used in links, e.g. plasma-collisions." error={errors.slug}>
          {(control) => (
            <Input {...control} name="slug" autoComplete="off" spellCheck={false} className="font-mono" />
          )}
        </Field>
        <Field label="Name" error={errors.name}>
          {(control) => <Input {...control} name="name" autoComplete="off" />}
        </Field>
      </div>
      <Field
        label="Description"
        hint="What the group computes, for the people you invite."
        error={errors.description}
      >
        {(control) => <Textarea {...control} name="description" rows={3} />}
      </Field>
      {unplaced ? <Notice tone="error">{describeError(createGroup.error).message}</Notice> : null}
      {createGroup.isSuccess ? (
        <Notice tone="success" onDismiss={() => createGroup.reset()}>
          Created <strong>{createGroup.data.name}</strong>. Invite its first admin from the group's
          Invitations page.
        </Notice>
      ) : null}
      <div>
        <Button type="submit" pending={createGroup.isPending}>
          Create group
        </Button>
      </div>
    </form>
  );
}
