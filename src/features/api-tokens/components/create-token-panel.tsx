import { createApiTokenRequestSchema } from "@shared/schemas";
import { KeyRound, TriangleAlert } from "lucide-react";
import { type FormEvent, useState } from "react";
import { Button } from "@/components/ui/button";
import { CopyableSecret } from "@/components/ui/copyable-secret";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { Select } from "@/components/ui/select";
import { describeError } from "@/lib/describe-error";
import type { FieldErrors } from "@/lib/field-errors";
import { readTextFields, validateWith, visibleFieldErrors } from "@/lib/form-errors";
import { useCreateApiToken } from "../hooks/use-token-mutations";

/** Choices for how long a token lives; "never" maps to `expiresInDays: null`. */
const EXPIRY_CHOICES = [
  { value: "30", label: "30 days" },
  { value: "90", label: "90 days" },
  { value: "180", label: "180 days" },
  { value: "365", label: "1 year" },
  { value: "never", label: "No expiry" },
] as const;
const DEFAULT_EXPIRY = "90";

export function CreateTokenPanel() {
  const create = useCreateApiToken();
  const [clientErrors, setClientErrors] = useState<FieldErrors | null>(null);
  const { errors, unplaced } = visibleFieldErrors(clientErrors, create.error, "name");

  function handleSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    const fields = readTextFields(form);
    const checked = validateWith(createApiTokenRequestSchema, {
      name: fields.name ?? "",
      expiresInDays: fields.expiresInDays === "never" ? null : Number(fields.expiresInDays ?? DEFAULT_EXPIRY),
    });
    if (!checked.ok) {
      create.reset();
      setClientErrors(checked.errors);
      return;
    }
    setClientErrors(null);
    create.mutate(checked.data, { onSuccess: () => form.reset() });
  }

  // The secret lives only in this mutation's result: "Done" resets it, and it is never cached or listed.
  if (create.isSuccess) {
    return (
      <section aria-labelledby="new-token-title" className="flex flex-col gap-4">
        <div className="flex items-center gap-2">
          <KeyRound className="size-5 text-flux-700" aria-hidden="true" />
          <h3 id="new-token-title" className="text-base font-semibold text-ink-900">
            Token “{create.data.token.name}” created
          </h3>
        </div>
        <Notice tone="warning">
          <span className="flex items-start gap-2">
            <TriangleAlert className="mt-0.5 size-4 shrink-0" aria-hidden="true" />
            <span>
              Copy this token now and keep it somewhere safe, such as your password manager. It will not be
              shown again.
            </span>
          </span>
        </Notice>
        <CopyableSecret value={create.data.secret} label="New API token secret" />
        <div>
          <Button variant="secondary" onClick={() => create.reset()}>
            Done, I have stored it
          </Button>
        </div>
      </section>
    );
  }

  return (
    <form onSubmit={handleSubmit} noValidate aria-label="Create an API token" className="flex flex-col gap-4">
      <div className="grid gap-4 sm:grid-cols-[minmax(0,1fr)_12rem]">
        <Field label="Name" hint="Name it after the script or machine that will use it." error={errors.name}>
          {(control) => (
            <Input {...control} name="name" autoComplete="off" placeholder="nightly-submit-script" />
          )}
        </Field>
        <Field label="Expires after" error={errors.expiresInDays}>
          {(control) => (
            <Select {...control} name="expiresInDays" defaultValue={DEFAULT_EXPIRY}>
              {EXPIRY_CHOICES.map((choice) => (
                <option key={choice.value} value={choice.value}>
                  {choice.label}
                </option>
              ))}
            </Select>
          )}
        </Field>
      </div>
      {unplaced ? <Notice tone="error">{describeError(create.error).message}</Notice> : null}
      <div>
        <Button type="submit" pending={create.isPending}>
          Create token
        </Button>
      </div>
    </form>
  );
}
