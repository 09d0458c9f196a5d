// The "Settings to look at" panel shown on a neutralizer's and a device's page.
import type { EquipmentWarning } from "@/lib/equipment-warnings";

export function SettingsWarnings({ warnings }: { warnings: EquipmentWarning[] }) {
  if (!warnings.length) return null;
  return (
    <div className="mb-5 rounded-card border border-near/40 bg-near-soft/60 px-4 py-2.5 text-sm" data-testid="equipment-warnings">
      <p className="font-semibold text-near">Settings to look at</p>
      <ul className="mt-1 list-disc pl-5 text-ink">
        {warnings.map((w) => (
          <li key={w.code}>
            {w.message} <span className="text-ink-faint">({w.source})</span>
          </li>
        ))}
      </ul>
    </div>
  );
}
