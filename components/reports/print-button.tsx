"use client";
// Opens the browser's print dialog; the printed page drops the navigation and the controls.
export function PrintButton({ label = "Print" }: { label?: string }) {
  return (
    <button type="button" onClick={() => window.print()} className="rounded border border-paper-line bg-paper-raised px-3 py-1.5 text-sm text-ink hover:bg-paper-sunk print:hidden">
      {label}
    </button>
  );
}
