"use client";
import { ActionForm, SubmitButton } from "@/components/forms/action-form";
import { sendDueListNow } from "../actions";

export function SendDueListButton() {
  return (
    <ActionForm action={sendDueListNow} className="flex flex-col items-end">
      <SubmitButton variant="quiet">Send due list now</SubmitButton>
    </ActionForm>
  );
}
