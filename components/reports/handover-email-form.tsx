"use client";
// E-mail the handover to the person taking over (shift leads and up; checked on the server).
import { ActionForm, Field, SubmitButton, inputClass, type FormResult } from "@/components/forms/action-form";

export function HandoverEmailForm({
  action,
  date,
  shift,
  recipients,
}: {
  action: (prev: FormResult, fd: FormData) => Promise<FormResult>;
  date: string;
  shift: string;
  recipients: { id: number; name: string; role: string }[];
}) {
  const roleWord: Record<string, string> = { shift_lead: "shift lead", engineer: "engineer", admin: "admin" };
  return (
    <ActionForm action={action} className="flex flex-wrap items-end gap-3" successMessage="Queued.">
      <input type="hidden" name="date" value={date} />
      <input type="hidden" name="shift" value={shift} />
      <Field label="Send to the next shift lead" name="toPersonId" className="min-w-[16rem]">
        <select name="toPersonId" defaultValue="" className={inputClass} data-testid="handover-recipient">
          <option value="">Choose who takes over…</option>
          {recipients.map((r) => (
            <option key={r.id} value={r.id}>
              {r.name} ({roleWord[r.role] ?? r.role})
            </option>
          ))}
        </select>
      </Field>
      <SubmitButton>E-mail the handover</SubmitButton>
    </ActionForm>
  );
}
