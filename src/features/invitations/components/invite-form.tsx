import { createInvitationRequestSchema, type GroupRole } from "@shared/schemas";
import { type FormEvent, useState } from "react";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Notice } from "@/components/ui/notice";
import { Select } from "@/components/ui/select";
import { describeError } from "@/lib/describe-error";
import type { FieldErrors } from "@/lib/field-errors";
import { readTextFields, validateWith, visibleFieldErrors } from "@/lib/form-errors";
import { formatDate } from "@/lib/format";
import { GROUP_ROLES, ROLE_DESCRIPTIONS, ROLE_LABELS } from "@/lib/roles";
import { useCreateInvitation } from "../hooks/use-invitation-mutations";

const DEFAULT_ROLE: GroupRole = "member";

export function InviteForm({ groupId }: { groupId: string }) {
  const invite = useCreateInvitation(groupId);
  const [clientErrors, setClientErrors] = useState<FieldErrors | null>(null);
  const [chosenRole, setChosenRole] = useState<GroupRole>(DEFAULT_ROLE);
  const { errors, unplaced } = visibleFieldErrors(clientErrors, invite.error, "email");

  function handleSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    const checked = validateWith(createInvitationRequestSchema, readTextFields(form));
    if (!checked.ok) {
      invite.reset();
      setClientErrors(checked.errors);
      return;
    }
    setClientErrors(null);
    invite.mutate(checked.data, {
      onSuccess: () => {
        form.reset();
        setChosenRole(DEFAULT_ROLE);
      },
    });
  }

  return (
    <form onSubmit={handleSubmit} noValidate aria-label="Invite by e-mail" className="flex flex-col gap-4">
      <div className="grid gap-4 sm:grid-cols-[minmax(0,1fr)_12rem]">
        <Field
          label="E-mail"
          error={errors.email}
          hint="Use the address they sign in with at their institution."
        >
          {(control) => (
            <Input
              {...control}
              name="email"
              type="email"
              autoComplete="off"
              placeholder="name@institute.example"
            />
          )}
        </Field>
        <Field label="Role" error={errors.role} hint={ROLE_DESCRIPTIONS[chosenRole]}>
          {(control) => (
            <Select
              {...control}
              name="role"
              defaultValue={DEFAULT_ROLE}
              onChange={(event) => setChosenRole(event.target.value as GroupRole)}
            >
              {GROUP_ROLES.map((role) => (
                <option key={role} value={role}>
                  {ROLE_LABELS[role]}
                </option>
              ))}
            </Select>
          )}
        </Field>
      </div>
      {unplaced ? <Notice tone="error">{describeError(invite.error).message}</Notice> : null}
      {invite.isSuccess ? (
        <Notice tone="success" onDismiss={() => invite.reset()}>
          Invitation sent to <strong>{invite.data.email}</strong>. The link in the e-mail works until{" "}
          {formatDate(invite.data.expiresAt)}.
        </Notice>
      ) : null}
      <div>
        <Button type="submit" pending={invite.isPending}>
          Send invitation
        </Button>
      </div>
    </form>
  );
}
