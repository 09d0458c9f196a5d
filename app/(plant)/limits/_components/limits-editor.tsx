"use client";
// The limits editor: pick a place (plant, hall, line, point), see the rules in force there and
// where each comes from, edit one (or override an inherited one here), replay the proposal over
// recorded data beside what the current rules raise, then save it as a new version. Saving is
// only offered once the values on screen have been replayed.
import { useRouter } from "next/navigation";
import { useState } from "react";
import clsx from "clsx";
import { fromPlantLocalInput, toPlantLocalInput } from "@/lib/plant-time";
import type { RuleKind, Severity } from "@/lib/vocabulary";
import type { ReplayResult } from "@/lib/views/replay";
import { HALL_KINDS } from "./rule-fields";
import { bodyOf, draftFrom, postJson, type Draft } from "./rule-draft";
import { KINDS, levelOf, matches, rulesInForce, type Place, type PlantTree, type RuleInfo } from "./rules-in-force";
import { PlacePicker } from "./place-picker";
import { RulesTable } from "./rules-table";
import { RuleDraftForm, type EditorMessage } from "./rule-draft-form";

export type { PlantTree, RuleInfo } from "./rules-in-force";

export function LimitsEditor({
  tree,
  rules,
  canEdit,
  timeZone,
  nowTs,
}: {
  tree: PlantTree;
  rules: RuleInfo[];
  canEdit: boolean;
  timeZone: string;
  nowTs: number;
}) {
  const router = useRouter();
  const plantPlace: Place = { level: "plant", areaId: null, lineId: null, pointId: null, label: "Plant-wide defaults" };
  const [place, setPlace] = useState<Place>(plantPlace);
  const [draft, setDraft] = useState<Draft | null>(null);
  const [fromText, setFromText] = useState(() => toPlantLocalInput(nowTs - 7 * 86_400_000, timeZone));
  const [toText, setToText] = useState(() => toPlantLocalInput(nowTs, timeZone));
  const [replay, setReplay] = useState<{ key: string; result: ReplayResult } | null>(null);
  const [busy, setBusy] = useState<"replay" | "save" | null>(null);
  const [message, setMessage] = useState<EditorMessage | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});

  const body = draft ? bodyOf(draft) : null;
  const spanFrom = fromPlantLocalInput(fromText, timeZone);
  const spanTo = fromPlantLocalInput(toText, timeZone);
  const replayKey = body ? JSON.stringify([body, spanFrom, spanTo]) : "";
  const replayed = replay !== null && replay.key === replayKey;

  const hallOfPlace = place.areaId !== null ? { level: "area" as const, areaId: place.areaId, lineId: null, pointId: null, label: tree.find((a) => a.id === place.areaId)?.name ?? "" } : null;

  function choose(p: Place) {
    setPlace(p);
    setDraft(null);
    setReplay(null);
    setMessage(null);
    setFieldErrors({});
  }

  function edit(rule: RuleInfo | null, kind: RuleKind, severity: Severity) {
    const own = rule !== null && levelOf(rule) === place.level && matches(rule, place);
    setDraft(draftFrom(rule, kind, severity, place, own));
    setReplay(null);
    setMessage(null);
    setFieldErrors({});
  }

  async function runReplay() {
    if (!body) return;
    if (spanFrom === null || spanTo === null) {
      setMessage({ tone: "error", text: "Enter the replay span as dates and times." });
      return;
    }
    setBusy("replay");
    setMessage(null);
    const key = replayKey;
    const r = await postJson<ReplayResult>("/api/rules/replay", { ...body, fromTs: spanFrom, toTs: spanTo });
    setBusy(null);
    if (r.ok) {
      setFieldErrors({});
      setReplay({ key, result: r.data });
    } else {
      setFieldErrors(r.error.fieldErrors ?? {});
      setMessage({ tone: "error", text: r.error.fieldErrors && Object.keys(r.error.fieldErrors).length ? "Please correct the marked fields." : (r.error.error ?? `The replay failed (HTTP ${r.status}).`) });
    }
  }

  async function save() {
    if (!draft || !body) return;
    setBusy("save");
    setMessage(null);
    const r = await postJson<{ ruleId: number; version: number; created: boolean }>("/api/rules", { ...body, comment: draft.comment.trim() || undefined });
    setBusy(null);
    if (r.ok) {
      setMessage({
        tone: "ok",
        text: `${r.data.created ? "Added a rule here" : `Saved version ${r.data.version}`}. The alerts engine uses it within a few seconds; the change is in the audit log below.`,
      });
      setDraft(null);
      setReplay(null);
      router.refresh();
    } else {
      setFieldErrors(r.error.fieldErrors ?? {});
      setMessage({ tone: "error", text: r.error.fieldErrors && Object.keys(r.error.fieldErrors).length ? "Please correct the marked fields." : (r.error.error ?? `Saving failed (HTTP ${r.status}).`) });
    }
  }

  const kindsHere = KINDS.filter((k) => !(HALL_KINDS.has(k) && (place.level === "line" || place.level === "point")));

  return (
    <div className="grid gap-5 lg:grid-cols-[16rem_1fr]">
      <PlacePicker tree={tree} place={place} plantPlace={plantPlace} onChoose={choose} />

      <div className="min-w-0 space-y-5">
        <RulesTable
          rules={rules}
          place={place}
          kindsHere={kindsHere}
          draft={draft}
          canEdit={canEdit}
          hallOfPlace={hallOfPlace}
          onChoose={choose}
          onEdit={edit}
          onAdd={(kind, severity) => {
            const inherited = rulesInForce(rules, place, kind).find((r) => r.severity === severity) ?? rulesInForce(rules, place, kind)[0] ?? null;
            setDraft(draftFrom(inherited, kind, severity, place, false));
            setReplay(null);
            setMessage(null);
            setFieldErrors({});
          }}
        />

        {message && !draft ? (
          <p role={message.tone === "error" ? "alert" : "status"} className={clsx("rounded px-3 py-2 text-sm", message.tone === "ok" ? "bg-brand-soft text-brand-deep" : "bg-over-soft text-over")} data-testid="limits-message">
            {message.text}
          </p>
        ) : null}

        {draft && canEdit ? (
          <RuleDraftForm
            draft={draft}
            setDraft={setDraft}
            fieldErrors={fieldErrors}
            fromText={fromText}
            setFromText={setFromText}
            toText={toText}
            setToText={setToText}
            busy={busy}
            replay={replay}
            replayed={replayed}
            runReplay={runReplay}
            save={save}
            message={message}
            timeZone={timeZone}
          />
        ) : null}
        <p className="text-xs text-ink-faint">
          Limits are plant settings, not published safety limits. In solvent areas, static hazards are assessed by a qualified person under NFPA 77, IEC TS 60079-32-1 and
          local codes; Stillfield is a monitoring aid, not a safety system. Times are plant time ({timeZone}).
        </p>
      </div>
    </div>
  );
}
