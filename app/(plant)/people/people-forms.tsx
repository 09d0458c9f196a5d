"use client";
import { ActionForm, Field, inputClass, SubmitButton } from "@/components/forms/action-form";
import { ROLE_LABELS, ROLE_NAMES, type Role } from "@/lib/permissions";
import { addPerson, resetPassword, setActive, setRole } from "./actions";

type Person = { id: number; name: string; email: string; role: Role; active: boolean };

export function AddPersonForm() {
  return (
    <ActionForm action={addPerson} className="space-y-3" successMessage="Added." resetOnSuccess>
      <Field label="Name" name="name">
        <input name="name" className={inputClass} required />
      </Field>
      <Field label="E-mail" name="email">
        <input name="email" type="email" className={inputClass} required />
      </Field>
      <Field label="Role" name="role">
        <select name="role" className={inputClass} defaultValue="viewer">
          {ROLE_NAMES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
      </Field>
      <Field label="First password" name="password" hint="At least 10 characters; tell them to keep it private.">
        <input name="password" type="password" autoComplete="new-password" className={inputClass} required />
      </Field>
      <SubmitButton>Add person</SubmitButton>
    </ActionForm>
  );
}

export function PersonRow({ person, isSelf }: { person: Person; isSelf: boolean }) {
  return (
    <tr className="border-t border-paper-line align-top" data-testid="person-row" data-email={person.email}>
      <td className="py-2 pr-3">
        <div className={person.active ? "font-medium" : "font-medium text-ink-faint line-through"}>{person.name}</div>
        <div className="text-xs text-ink-faint">{person.email}</div>
      </td>
      <td className="py-2 pr-3">
        <ActionForm action={setRole} className="flex items-center gap-1.5">
          <input type="hidden" name="id" value={person.id} />
          <select name="role" defaultValue={person.role} className={`${inputClass} w-32 min-w-[8rem]`} aria-label={`Role of ${person.name}`}>
            {ROLE_NAMES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
          <SubmitButton variant="quiet">Set</SubmitButton>
        </ActionForm>
      </td>
      <td className="py-2 pr-3">
        <ActionForm action={setActive}>
          <input type="hidden" name="id" value={person.id} />
          <input type="hidden" name="active" value={person.active ? "false" : "true"} />
          <span className="mr-2 text-xs text-ink-soft">{person.active ? "Active" : "Deactivated"}</span>
          {!isSelf ? <SubmitButton variant={person.active ? "danger" : "quiet"}>{person.active ? "Deactivate" : "Reactivate"}</SubmitButton> : null}
        </ActionForm>
      </td>
      <td className="py-2">
        <ActionForm action={resetPassword} className="flex items-start gap-1.5" successMessage="Password changed." resetOnSuccess>
          <input type="hidden" name="id" value={person.id} />
          <Field label="" name="password" className="min-w-[9rem]">
            <input name="password" type="password" autoComplete="new-password" placeholder="New password" className={`${inputClass} w-36`} aria-label={`New password for ${person.name}`} />
          </Field>
          <SubmitButton variant="quiet">Reset</SubmitButton>
        </ActionForm>
      </td>
    </tr>
  );
}
