// The one mail-rendering module's shared parts: the shape every Stillfield e-mail is rendered
// to (subject, plain text, HTML), HTML escaping, links into the app, plain-text dates, and the
// cautions. The e-mails themselves are beside this file: alert-emails.ts (on-call and daily
// digest), due-list-email.ts (weekly due list), handover-email.ts (shift handover). Pure.
import { localDateOf } from "../plant-time";

export type MailText = { subject: string; text: string; html: string };

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c);
}

/** `${appUrl}${path}` without a doubled slash. */
export function appLink(appUrl: string, path: string): string {
  return `${appUrl.replace(/\/$/, "")}${path}`;
}

/** The line page at a moment. */
export function lineLinkAt(appUrl: string, lineId: number, ts: number): string {
  return appLink(appUrl, `/lines/${lineId}?at=${ts}`);
}

/** "2026-01-12" in the plant's time zone. */
export function mailDate(ts: number, timeZone: string): string {
  return localDateOf(ts, timeZone);
}

/** Under every alert e-mail (the hazard screens' cautions, in words). */
export const MONITORING_CAUTION =
  "Stillfield is a monitoring aid, not a safety system. Where solvents are used, static hazards are assessed by a qualified person under NFPA 77, IEC TS 60079-32-1 and local codes; isolate power units before touching neutralizers.";

/** Under the due list (people about to touch neutralizers). */
export const MAINTENANCE_CAUTION =
  "Caution: neutralizer power units carry several kilovolts. Isolate the power unit and follow the plant's lockout procedure before cleaning or touching emitters. Stillfield is a record-keeping aid, not a safety system.";
