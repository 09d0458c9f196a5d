// The "found late" mark of an alert raised by the re-check of late readings (a store-and-forward
// upload, a delayed batch): a word, not a colour alone, with when it was found and whether
// anyone was paged (ingest/late-recheck.ts, LATE_FINDING_QUIET_AFTER_MS in lib/settings.ts).
import { formatPlantTime } from "@/lib/plant-time";
import type { AlertListItem } from "@/lib/views/alerts";

export function FoundLateMark({ a, timeZone }: { a: Pick<AlertListItem, "foundLateTs" | "foundLateQuiet">; timeZone: string }) {
  if (a.foundLateTs === null || a.foundLateTs === undefined) return null;
  const when = formatPlantTime(a.foundLateTs, timeZone, "d MMM HH:mm");
  const title = `Found ${when} when late readings were re-checked; ${a.foundLateQuiet ? "it had ended long before, so nobody was paged" : "on call was paged"}`;
  return (
    <span
      className="ml-1.5 inline-flex items-center gap-1 rounded border border-paper-line bg-paper-sunk px-1 py-0.5 text-[11px] font-normal text-ink-soft"
      title={title}
      data-testid="found-late"
    >
      <span aria-hidden="true">↺</span>found late{a.foundLateQuiet ? " · nobody paged" : ""}
    </span>
  );
}
