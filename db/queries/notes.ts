// Line notes: what a shift lead wrote at a moment on a line ("new roll", "bar cleaned"),
// optionally about one point. Shown on the line's charts for everyone.
import { and, asc, eq, gte, lte } from "drizzle-orm";
import type { Db } from "../client";
import { lineNotes, people, points } from "../schema";
import { NOTE_MAX_LENGTH, type LineNote } from "../../lib/views/notes";

export async function listLineNotes(db: Db, q: { lineId: number; fromTs: number; toTs: number; limit?: number }): Promise<LineNote[]> {
  return db
    .select({
      id: lineNotes.id,
      lineId: lineNotes.lineId,
      pointId: lineNotes.pointId,
      ts: lineNotes.ts,
      text: lineNotes.text,
      personName: people.name,
      createdTs: lineNotes.createdTs,
    })
    .from(lineNotes)
    .innerJoin(people, eq(people.id, lineNotes.personId))
    .where(and(eq(lineNotes.lineId, q.lineId), gte(lineNotes.ts, q.fromTs), lte(lineNotes.ts, q.toTs)))
    .orderBy(asc(lineNotes.ts), asc(lineNotes.id))
    .limit(Math.min(q.limit ?? 500, 2000));
}

/** True when the point exists and lies on the line. */
export async function pointIsOnLine(db: Db, pointId: number, lineId: number): Promise<boolean> {
  const rows = await db.select({ id: points.id }).from(points).where(and(eq(points.id, pointId), eq(points.lineId, lineId))).limit(1);
  return rows.length > 0;
}

export async function addLineNote(
  db: Pick<Db, "insert">,
  n: { lineId: number; pointId: number | null; ts: number; text: string; personId: number },
  nowMs = Date.now(),
): Promise<number> {
  const [res] = await db.insert(lineNotes).values({
    lineId: n.lineId,
    pointId: n.pointId,
    ts: n.ts,
    text: n.text.slice(0, NOTE_MAX_LENGTH),
    personId: n.personId,
    createdTs: nowMs,
  });
  return Number(res.insertId);
}
