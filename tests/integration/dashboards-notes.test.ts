// Line notes: who may add them (checked on the server), what is refused, how they read back.
// Runs against the stack's test database (fresh and seeded by the test runner).
import { afterAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { closeDb, getDb } from "@/db/client";
import { lineNotes, people } from "@/db/schema";
import { getPlantLayout } from "@/db/queries/plant";
import { listLineNotes } from "@/db/queries/notes";
import { addNoteAction } from "@/app/_server/actions/notes";
import type { SessionPerson } from "@/app/_server/session";
import { DEMO_PEOPLE } from "@/lib/demo-plant";

async function sessionOf(role: string): Promise<SessionPerson> {
  const p = DEMO_PEOPLE.find((x) => x.role === role)!;
  const row = (await getDb().select({ id: people.id }).from(people).where(eq(people.email, p.email)))[0];
  return { personId: row.id, role: p.role, name: p.name, email: p.email };
}

async function twoLines() {
  const layout = await getPlantLayout(getDb());
  const lines = layout.flatMap((a) => a.lines);
  return { a: lines[0], b: lines[1] };
}

afterAll(async () => {
  await closeDb();
});

describe("adding a note", () => {
  it("a viewer is refused with 403 and nothing is written", async () => {
    const { a } = await twoLines();
    const before = (await getDb().select({ id: lineNotes.id }).from(lineNotes)).length;
    const r = await addNoteAction.run(await sessionOf("viewer"), { lineId: a.id, ts: Date.now(), text: "should not be saved" });
    expect(r).toMatchObject({ ok: false, status: 403 });
    expect((await getDb().select({ id: lineNotes.id }).from(lineNotes)).length).toBe(before);
  });

  it("no session is a 401", async () => {
    const { a } = await twoLines();
    expect(await addNoteAction.run(null, { lineId: a.id, ts: Date.now(), text: "x" })).toMatchObject({ ok: false, status: 401 });
  });

  it("a shift lead adds a note at a moment, optionally about a point; everyone reads it back", async () => {
    const { a } = await twoLines();
    const lead = await sessionOf("shift_lead");
    const ts = Date.now() - 30 * 60_000;
    const fd = new FormData();
    fd.set("lineId", String(a.id));
    fd.set("pointId", String(a.points[0].id));
    fd.set("ts", String(ts));
    fd.set("text", "  new roll of film  ");
    const r = await addNoteAction.run(lead, fd);
    expect(r.ok).toBe(true);
    const r2 = await addNoteAction.run(await sessionOf("engineer"), { lineId: a.id, pointId: "", ts: ts + 60_000, text: "cleaned the bar at the unwind" });
    expect(r2.ok).toBe(true);
    const notes = await listLineNotes(getDb(), { lineId: a.id, fromTs: ts - 1000, toTs: ts + 120_000 });
    expect(notes.map((n) => n.text)).toEqual(["new roll of film", "cleaned the bar at the unwind"]);
    expect(notes[0]).toMatchObject({ pointId: a.points[0].id, ts, personName: lead.name });
    expect(notes[1].pointId).toBeNull();
    expect(JSON.stringify(notes)).not.toMatch(/password|\$2[aby]\$/i);
    expect(await listLineNotes(getDb(), { lineId: a.id, fromTs: ts + 200_000, toTs: ts + 300_000 })).toEqual([]);
  });

  it("refuses empty text, a time in the future, a point of another line and an unknown line", async () => {
    const { a, b } = await twoLines();
    const lead = await sessionOf("shift_lead");
    const empty = await addNoteAction.run(lead, { lineId: a.id, ts: Date.now(), text: "   " });
    expect(empty).toMatchObject({ ok: false, status: 400 });
    if (!empty.ok) expect(empty.fieldErrors?.text?.[0]).toMatch(/Write what happened/);
    const future = await addNoteAction.run(lead, { lineId: a.id, ts: Date.now() + 3_600_000, text: "later" });
    expect(future).toMatchObject({ ok: false, status: 400 });
    if (!future.ok) expect(future.fieldErrors?.ts?.[0]).toMatch(/future/);
    const foreign = await addNoteAction.run(lead, { lineId: a.id, pointId: b.points[0].id, ts: Date.now(), text: "wrong point" });
    expect(foreign).toMatchObject({ ok: false, status: 400 });
    const unknown = await addNoteAction.run(lead, { lineId: 999_999, ts: Date.now(), text: "nowhere" });
    expect(unknown).toMatchObject({ ok: false, status: 404 });
    const long = await addNoteAction.run(lead, { lineId: a.id, ts: Date.now(), text: "x".repeat(501) });
    expect(long).toMatchObject({ ok: false, status: 400 });
  });
});
