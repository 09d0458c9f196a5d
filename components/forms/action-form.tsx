"use client";
// A form posting to a server action through useActionState; shows the server's message and
// the field errors next to their fields (FieldError reads them from context).
import { createContext, useActionState, useContext, useEffect, useRef } from "react";
import clsx from "clsx";

export type FormResult =
  | { ok: true; data?: unknown; message?: string }
  | { ok: false; status: number; message: string; fieldErrors?: Record<string, string[]> }
  | null;

const ErrorsContext = createContext<Record<string, string[]> | undefined>(undefined);

export function ActionForm({
  action,
  children,
  className,
  successMessage,
  resetOnSuccess = false,
  onSuccess,
}: {
  action: (prev: FormResult, fd: FormData) => Promise<FormResult>;
  children: React.ReactNode;
  className?: string;
  successMessage?: string;
  resetOnSuccess?: boolean;
  onSuccess?: (result: FormResult) => void;
}) {
  const [state, formAction, pending] = useActionState(action, null);
  const ref = useRef<HTMLFormElement>(null);
  useEffect(() => {
    if (state?.ok) {
      if (resetOnSuccess) ref.current?.reset();
      onSuccess?.(state);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps -- run once per server answer, not when the callbacks' identity changes
  }, [state]);
  return (
    <ErrorsContext.Provider value={state && !state.ok ? state.fieldErrors : undefined}>
      <form ref={ref} action={formAction} className={className} aria-busy={pending}>
        <fieldset disabled={pending} className="contents">
          {children}
        </fieldset>
        {state && !state.ok ? (
          <p role="alert" className="mt-2 rounded bg-over-soft px-3 py-1.5 text-sm text-over" data-testid="form-error">
            {state.message}
          </p>
        ) : null}
        {state?.ok && (successMessage || state.message) ? (
          <p role="status" className="mt-2 text-sm text-ink-soft" data-testid="form-ok">
            {state.message ?? successMessage}
          </p>
        ) : null}
      </form>
    </ErrorsContext.Provider>
  );
}

export function FieldError({ name }: { name: string }) {
  const errors = useContext(ErrorsContext)?.[name];
  if (!errors?.length) return null;
  return <span className="mt-0.5 block text-xs text-over">{errors[0]}</span>;
}

export const inputClass =
  "block w-full rounded border border-paper-line bg-white px-2.5 py-1.5 text-sm outline-none focus:border-brand focus:ring-2 focus:ring-brand-soft";

export function Field({ label, name, children, hint, className }: { label: string; name: string; children: React.ReactNode; hint?: string; className?: string }) {
  return (
    <label className={clsx("block", className)}>
      <span className="text-xs font-medium text-ink-soft">{label}</span>
      <span className="mt-1 block">{children}</span>
      {hint ? <span className="mt-0.5 block text-xs text-ink-faint">{hint}</span> : null}
      <FieldError name={name} />
    </label>
  );
}

export function SubmitButton({ children, variant = "primary" }: { children: React.ReactNode; variant?: "primary" | "quiet" | "danger" }) {
  return (
    <button
      type="submit"
      className={clsx(
        "rounded px-3 py-1.5 text-sm font-medium disabled:opacity-50",
        variant === "primary" && "bg-brand text-white hover:bg-brand-deep",
        variant === "quiet" && "border border-paper-line bg-paper-raised text-ink hover:bg-paper-sunk",
        variant === "danger" && "border border-over/40 bg-paper-raised text-over hover:bg-over-soft",
      )}
    >
      {children}
    </button>
  );
}
