// Small shared bits of the Devices pages.
import { REJECTION_REASON_LABELS, REJECTION_REASONS, type RejectionReason } from "@/lib/contract/readings-payload";

/** A device that has not sent anything for this long shows as silent (the default silent rule is 120 s). */
export const SILENT_AFTER_MS = 120_000;

const isReason = (r: string): r is RejectionReason => (REJECTION_REASONS as readonly string[]).includes(r);

export function reasonLabel(reason: string): string {
  return isReason(reason) ? REJECTION_REASON_LABELS[reason] : reason;
}
