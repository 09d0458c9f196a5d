"use client";
// The reader's unit choice (kV or V, °C or °F), defaulting to the plant's settings and kept in
// this browser (localStorage). Every live view formats through lib/units with these.
import { createContext, useCallback, useContext, useEffect, useMemo, useState } from "react";
import clsx from "clsx";
import { parseUnitPrefs, type UnitPrefs } from "@/lib/units";

const STORAGE_KEY = "stillfield.units";

type UnitsValue = { prefs: UnitPrefs; setPrefs: (p: UnitPrefs) => void };
const UnitsContext = createContext<UnitsValue>({ prefs: { chargeUnit: "kV", tempUnit: "C" }, setPrefs: () => undefined });

export function UnitsProvider({ defaults, children }: { defaults: UnitPrefs; children: React.ReactNode }) {
  const [prefs, setState] = useState<UnitPrefs>(defaults);
  useEffect(() => {
    try {
      const raw = window.localStorage.getItem(STORAGE_KEY);
      // eslint-disable-next-line react-hooks/set-state-in-effect -- localStorage exists only in the browser; reading it after mount keeps the first render equal to the server HTML
      if (raw) setState(parseUnitPrefs(JSON.parse(raw), defaults));
    } catch {
      /* private mode or a corrupt value: keep the plant's defaults */
    }
  }, [defaults]);
  const setPrefs = useCallback((p: UnitPrefs) => {
    setState(p);
    try {
      window.localStorage.setItem(STORAGE_KEY, JSON.stringify(p));
    } catch {
      /* not stored; still applies to this page */
    }
  }, []);
  const value = useMemo(() => ({ prefs, setPrefs }), [prefs, setPrefs]);
  return <UnitsContext.Provider value={value}>{children}</UnitsContext.Provider>;
}

export function useUnits(): UnitsValue {
  return useContext(UnitsContext);
}

function Segmented<T extends string>({ label, value, options, onChange }: { label: string; value: T; options: Array<{ value: T; text: string }>; onChange: (v: T) => void }) {
  return (
    <div role="group" aria-label={label} className="inline-flex overflow-hidden rounded border border-paper-line text-xs">
      {options.map((o) => (
        <button
          key={o.value}
          type="button"
          aria-pressed={o.value === value}
          onClick={() => onChange(o.value)}
          className={clsx("px-2 py-1", o.value === value ? "bg-ink text-paper-raised" : "bg-paper-raised text-ink-soft hover:bg-paper-sunk")}
        >
          {o.text}
        </button>
      ))}
    </div>
  );
}

export function UnitsToggle() {
  const { prefs, setPrefs } = useUnits();
  return (
    <div className="flex items-center gap-2">
      <Segmented
        label="Charge unit"
        value={prefs.chargeUnit}
        options={[
          { value: "kV", text: "kV" },
          { value: "V", text: "V" },
        ]}
        onChange={(chargeUnit) => setPrefs({ ...prefs, chargeUnit })}
      />
      <Segmented
        label="Temperature unit"
        value={prefs.tempUnit}
        options={[
          { value: "C", text: "°C" },
          { value: "F", text: "°F" },
        ]}
        onChange={(tempUnit) => setPrefs({ ...prefs, tempUnit })}
      />
    </div>
  );
}
