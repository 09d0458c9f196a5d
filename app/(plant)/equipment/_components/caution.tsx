// The caution shown wherever Stillfield guides maintenance of neutralizers (the safety notes in README.md).
export function HighVoltageCaution({ compact = false }: { compact?: boolean }) {
  return (
    <aside role="note" aria-label="Caution" className="rounded-card border border-near/40 border-l-4 border-l-near bg-near-soft/50 px-4 py-2.5 text-sm text-ink" data-testid="hv-caution">
      <p className="flex items-center gap-2 font-semibold text-near">
        <svg viewBox="0 0 12 12" className="h-3.5 w-3.5" aria-hidden="true">
          <path d="M6 1 L11 11 L1 11 Z" fill="currentColor" />
        </svg>
        Caution — high voltage
      </p>
      <p className="mt-1 leading-relaxed text-ink-soft">
        Neutralizer power units carry several kilovolts. Isolate the power unit and follow the plant&apos;s lockout procedure before cleaning or touching emitters.
        {compact ? null : (
          <>
            {" "}
            In solvent areas follow NFPA 77, IEC TS 60079-32-1 and local codes; hazardous areas are assessed by a qualified person. Stillfield is a record-keeping aid, not a safety system, and does not
            replace a qualified person&apos;s assessment.
          </>
        )}
      </p>
    </aside>
  );
}
