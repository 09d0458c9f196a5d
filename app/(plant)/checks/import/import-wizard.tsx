"use client";
// Choose → preview (detected columns, units, first rows) → map → import → result.
import { useEffect, useRef, useState } from "react";
import { useRouter } from "next/navigation";
import { inputClass } from "@/components/forms/action-form";
import { Card } from "@/components/ui/page";
import { StateBadge } from "@/components/ui/state-badge";
import { FIELD_LABELS, FIELDS_BY_KIND, requiredFields, UNIT_CHOICES, type CsvAnalysis, type ImportField, type ImportKind, type UnitField } from "@/lib/csv-import";

type Preview = {
  analysis: CsvAnalysis;
  fileName: string;
  previousImports: { createdTs: number; personName: string | null; rowsImported: number }[];
  logger: { id: number; code: string } | null;
  rawRetentionDays: number;
};

type ImportResult =
  | { kind: "check_log"; fileName: string; imported: number; duplicates: number; passed: number; failed: number; rejected: { line: number; reason: string }[] }
  | {
      kind: "humidity_log";
      fileName: string;
      deviceCode: string;
      rowsImported: number;
      rawValuesAdded: number;
      rollupOnlyValuesAdded: number;
      duplicates: number;
      rejected: { line: number; reason: string }[];
      rawRetentionDays: number;
    };

const UNIT_SOURCE_WORDS: Record<string, string> = { header: "from the column name", values: "guessed from the values", default: "assumed", chosen: "chosen" };
const DELIMITER_WORDS: Record<string, string> = { ",": "commas", ";": "semicolons", "\t": "tabs", "|": "bars (|)" };

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null;
}

async function post(url: string, fd: FormData): Promise<{ ok: true; body: unknown } | { ok: false; message: string; fieldErrors?: Record<string, string[]> }> {
  const res = await fetch(url, { method: "POST", body: fd });
  const body: unknown = await res.json().catch(() => null);
  if (res.ok) return { ok: true, body };
  const message = isRecord(body) && typeof body.error === "string" ? body.error : `The server answered ${res.status}.`;
  const fe = isRecord(body) && isRecord(body.fieldErrors) ? (body.fieldErrors as Record<string, string[]>) : undefined;
  return { ok: false, message, fieldErrors: fe };
}

export function ImportWizard({ halls, rawRetentionDays, timeZone }: { halls: { id: number; name: string }[]; rawRetentionDays: number; timeZone: string }) {
  const router = useRouter();
  const [kind, setKind] = useState<ImportKind>("check_log");
  const [areaId, setAreaId] = useState<string>("");
  const [file, setFile] = useState<File | null>(null);
  const [mapping, setMapping] = useState<Partial<Record<ImportField, number | null>>>({});
  const [units, setUnits] = useState<Partial<Record<UnitField, string>>>({});
  const [dateOrder, setDateOrder] = useState<"" | "dmy" | "mdy">("");
  const [preview, setPreview] = useState<Preview | null>(null);
  const [result, setResult] = useState<ImportResult | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const resultRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (result) resultRef.current?.scrollIntoView({ block: "start" });
  }, [result]);

  const form = (over: { mapping?: typeof mapping; units?: typeof units; dateOrder?: typeof dateOrder; kind?: ImportKind; file?: File | null } = {}) => {
    const fd = new FormData();
    const f = over.file !== undefined ? over.file : file;
    if (f) fd.set("file", f);
    fd.set("kind", over.kind ?? kind);
    fd.set("areaId", areaId);
    const m = over.mapping ?? mapping;
    if (Object.keys(m).length) fd.set("mapping", JSON.stringify(m));
    const u = over.units ?? units;
    if (Object.keys(u).length) fd.set("units", JSON.stringify(u));
    const d = over.dateOrder ?? dateOrder;
    if (d) fd.set("dateOrder", d);
    return fd;
  };

  async function runPreview(over: Parameters<typeof form>[0] = {}) {
    const f = over.file !== undefined ? over.file : file;
    if (!f) return;
    setBusy(true);
    setError(null);
    setResult(null);
    const r = await post("/api/imports/preview", form(over));
    if (r.ok && isRecord(r.body)) setPreview(r.body as Preview);
    else if (!r.ok) setError(r.message);
    setBusy(false);
  }

  async function runImport() {
    setBusy(true);
    setError(null);
    const r = await post("/api/imports", form());
    if (r.ok && isRecord(r.body)) {
      setResult(r.body as ImportResult);
      router.refresh();
    } else if (!r.ok) setError(r.fieldErrors?.areaId?.[0] ?? r.message);
    setBusy(false);
  }

  const a = preview?.analysis;
  const fields = FIELDS_BY_KIND[kind];
  const required = requiredFields(kind);

  return (
    <div className="space-y-5" data-testid="import-wizard">
      <Card title="1 · Choose the file">
        <div className="grid gap-3 sm:grid-cols-[1fr_1fr]">
          <fieldset>
            <legend className="text-xs font-medium text-ink-soft">What the file holds</legend>
            <div className="mt-1 space-y-1 text-sm">
              {(
                [
                  ["check_log", "Check log of a charged-plate instrument"],
                  ["humidity_log", "Humidity history of a standalone logger"],
                ] as const
              ).map(([k, label]) => (
                <label key={k} className="flex items-center gap-2">
                  <input
                    type="radio"
                    name="kind"
                    value={k}
                    checked={kind === k}
                    className="accent-brand"
                    onChange={() => {
                      setKind(k);
                      setMapping({});
                      setUnits({});
                      void runPreview({ kind: k, mapping: {}, units: {} });
                    }}
                  />
                  {label}
                </label>
              ))}
            </div>
          </fieldset>
          {kind === "humidity_log" ? (
            <label className="block">
              <span className="text-xs font-medium text-ink-soft">Hall the logger was in</span>
              <select className={`${inputClass} mt-1`} value={areaId} onChange={(e) => setAreaId(e.target.value)} name="areaId">
                <option value="">Choose…</option>
                {halls.map((h) => (
                  <option key={h.id} value={h.id}>
                    {h.name}
                  </option>
                ))}
              </select>
              <span className="mt-0.5 block text-xs text-ink-faint">The readings join the hall&apos;s logger, like live data.</span>
            </label>
          ) : null}
        </div>
        <input
          type="file"
          accept=".csv,.txt,text/csv,text/plain"
          aria-label="CSV file"
          className="mt-3 block w-full text-sm text-ink-soft file:mr-3 file:rounded file:border file:border-paper-line file:bg-paper-raised file:px-3 file:py-1.5 file:text-sm file:text-ink"
          onChange={(e) => {
            const f = e.target.files?.[0] ?? null;
            setFile(f);
            setMapping({});
            setUnits({});
            setDateOrder("");
            setPreview(null);
            void runPreview({ file: f, mapping: {}, units: {}, dateOrder: "" });
          }}
        />
        {error ? (
          <p role="alert" className="mt-2 rounded bg-over-soft px-3 py-1.5 text-sm text-over">
            {error}
          </p>
        ) : null}
      </Card>

      {a ? (
        <Card title="2 · Check the columns" aside={busy ? <span className="text-xs text-ink-faint">reading…</span> : null}>
          <p className="text-sm text-ink-soft" data-testid="import-detected">
            {preview!.fileName}: separated by {DELIMITER_WORDS[a.delimiter] ?? a.delimiter}
            {a.decimalComma ? ", decimal commas" : ""}
            {a.hadBom ? ", byte-order mark" : ""}
            {a.headerLine !== null ? `, column names on line ${a.headerLine}` : ""}; dates {a.dateOrder === "dmy" ? "day/month" : "month/day"} ({a.dateOrderSource === "values" ? "from the values" : a.dateOrderSource}); times in{" "}
            {a.timesIn === "utc" ? "UTC" : `plant time (${timeZone})`}.
          </p>
          {preview!.previousImports.length ? (
            <p className="mt-2 rounded bg-near-soft px-3 py-1.5 text-sm text-ink" data-testid="import-previous">
              This file was imported before ({preview!.previousImports.length}×). Importing it again adds nothing that is already there.
            </p>
          ) : null}
          {a.fileErrors.map((m) => (
            <p key={m} role="alert" className="mt-2 rounded bg-over-soft px-3 py-1.5 text-sm text-over">
              {m}
            </p>
          ))}

          <table className="mt-3 w-full text-sm" data-testid="import-mapping">
            <thead className="text-left text-xs text-ink-faint">
              <tr>
                <th className="pb-1 font-medium">Field</th>
                <th className="pb-1 font-medium">Column in the file</th>
                <th className="pb-1 font-medium">Unit</th>
              </tr>
            </thead>
            <tbody>
              {fields.map((f) => {
                const unitField = f in UNIT_CHOICES ? (f as UnitField) : null;
                return (
                  <tr key={f} className="border-t border-paper-line">
                    <td className="py-1.5 pr-3">
                      {FIELD_LABELS[f]}
                      {required.includes(f) ? <span className="text-over"> *</span> : null}
                    </td>
                    <td className="py-1.5 pr-3">
                      <select
                        className={inputClass}
                        aria-label={`Column for ${FIELD_LABELS[f]}`}
                        value={String(a.mapping[f] ?? -1)}
                        onChange={(e) => {
                          const next = { ...mapping, [f]: Number(e.target.value) < 0 ? null : Number(e.target.value) };
                          setMapping(next);
                          void runPreview({ mapping: next });
                        }}
                      >
                        <option value={-1}>— not in the file —</option>
                        {a.headers.map((h, i) => (
                          <option key={i} value={i}>
                            {i + 1}. {h || "(no name)"}
                          </option>
                        ))}
                      </select>
                    </td>
                    <td className="py-1.5">
                      {unitField && a.mapping[f] !== null && a.mapping[f] !== undefined ? (
                        <span className="flex items-center gap-2 whitespace-nowrap">
                          <select
                            className={`${inputClass} w-20!`}
                            aria-label={`Unit of ${FIELD_LABELS[f]}`}
                            value={a.units[unitField]}
                            onChange={(e) => {
                              const next = { ...units, [unitField]: e.target.value };
                              setUnits(next);
                              void runPreview({ units: next });
                            }}
                          >
                            {UNIT_CHOICES[unitField].map((u) => (
                              <option key={u} value={u}>
                                {u}
                              </option>
                            ))}
                          </select>
                          <span className="text-xs text-ink-faint">{UNIT_SOURCE_WORDS[a.unitSources[unitField] ?? "default"]}</span>
                        </span>
                      ) : (
                        <span className="text-ink-faint">—</span>
                      )}
                    </td>
                  </tr>
                );
              })}
              <tr className="border-t border-paper-line">
                <td className="py-1.5 pr-3">Date order</td>
                <td className="py-1.5 pr-3">
                  <select
                    className={inputClass}
                    aria-label="Date order"
                    value={a.dateOrder}
                    onChange={(e) => {
                      const next = e.target.value === "mdy" ? "mdy" : "dmy";
                      setDateOrder(next);
                      void runPreview({ dateOrder: next });
                    }}
                  >
                    <option value="dmy">day / month / year</option>
                    <option value="mdy">month / day / year</option>
                  </select>
                </td>
                <td />
              </tr>
            </tbody>
          </table>

          {a.preview.length ? (
            <div className="mt-4 overflow-x-auto">
              <p className="mb-1 text-xs font-medium text-ink-soft">First rows as they are in the file</p>
              <table className="w-full text-xs" data-testid="import-preview">
                <thead className="text-left text-ink-faint">
                  <tr>
                    <th className="py-1 pr-3 font-medium">Line</th>
                    {a.headers.map((h, i) => {
                      const field = fields.find((f) => a.mapping[f] === i);
                      return (
                        <th key={i} className={`py-1 pr-3 font-medium ${field ? "text-brand-deep" : ""}`}>
                          {h}
                          {field ? <span className="block font-normal text-ink-faint">→ {FIELD_LABELS[field].split(" (")[0]}</span> : null}
                        </th>
                      );
                    })}
                  </tr>
                </thead>
                <tbody className="num">
                  {a.preview.map((r) => (
                    <tr key={r.line} className="border-t border-paper-line">
                      <td className="py-1 pr-3 text-ink-faint">{r.line}</td>
                      {a.headers.map((_, i) => (
                        <td key={i} className="py-1 pr-3">
                          {r.cells[i] ?? <span className="text-over">missing</span>}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          ) : null}

          {kind === "humidity_log" ? (
            <p className="mt-3 text-xs text-ink-soft">
              {preview!.logger ? <>Readings go to logger <b>{preview!.logger.code}</b>. </> : areaId ? <span className="text-over">This hall has no logger device. </span> : null}
              Rows older than {rawRetentionDays} days (the raw-data retention) go into the 1-minute and 1-hour summaries only: charts over weeks and months show them, raw-data views do not.
            </p>
          ) : null}

          <div className="mt-4 flex items-center gap-3">
            <button
              type="button"
              onClick={() => void runImport()}
              disabled={busy || a.fileErrors.length > 0 || (kind === "humidity_log" && !areaId)}
              className="rounded bg-brand px-4 py-1.5 text-sm font-medium text-white hover:bg-brand-deep disabled:opacity-50"
            >
              Import
            </button>
            {kind === "humidity_log" && !areaId ? <span className="text-xs text-ink-faint">Choose the hall first.</span> : null}
          </div>
        </Card>
      ) : null}

      {result ? (
        <div ref={resultRef} className="scroll-mt-20">
        <Card title="3 · Result">
          <div role="status" className="flex flex-wrap gap-2" data-testid="import-result">
            {result.kind === "check_log" ? (
              <>
                <StateBadge state="normal" label={`${result.imported} checks added`} />
                {result.failed ? <StateBadge state="over" label={`${result.failed} of them failed`} /> : null}
                {result.duplicates ? <StateBadge state="silent" label={`${result.duplicates} already there`} /> : null}
              </>
            ) : (
              <>
                <StateBadge state="normal" label={`${result.rowsImported} rows added to ${result.deviceCode}`} />
                {result.rollupOnlyValuesAdded ? <StateBadge state="silent" label={`${result.rollupOnlyValuesAdded} values older than ${result.rawRetentionDays} days: summaries only`} /> : null}
                {result.duplicates ? <StateBadge state="silent" label={`${result.duplicates} values already there`} /> : null}
              </>
            )}
            {result.rejected.length ? <StateBadge state="near" label={`${result.rejected.length} rows rejected`} /> : null}
          </div>
          {result.rejected.length ? (
            <table className="mt-3 w-full text-sm" data-testid="import-rejected">
              <thead className="text-left text-xs text-ink-faint">
                <tr>
                  <th className="w-16 pb-1 font-medium">Line</th>
                  <th className="pb-1 font-medium">Why it was not imported</th>
                </tr>
              </thead>
              <tbody>
                {result.rejected.map((r) => (
                  <tr key={`${r.line}-${r.reason}`} className="border-t border-paper-line">
                    <td className="num py-1 text-ink-soft">{r.line}</td>
                    <td className="py-1">{r.reason}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
        </Card>
        </div>
      ) : null}
    </div>
  );
}
