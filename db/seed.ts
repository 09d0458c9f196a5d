// Seeds the demo plant (lib/demo-plant.ts) once: halls, lines, points, devices with secrets,
// neutralizers, default limits, an on-call roster and one person per role. A second run finds
// the seed marker and changes nothing. Device secrets (plain) go to a git-ignored file under
// the data folder for the simulators; the database keeps only their hashes.
import fs from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import { closeDb, getDb, type Db } from "./client";
import { getEnv } from "./env";
import * as s from "./schema";
import { createPerson } from "./queries/people";
import { seedDemoSurveys } from "./queries/surveys-demo";
import {
  DEMO_AREAS,
  DEMO_LINES,
  DEMO_PEOPLE,
  DEMO_PLANT_NAME,
  DEMO_PLANT_LOCATION,
  fieldMeterCode,
  loggerCode,
  DEMO_CHECKS,
  demoNeutralizer,
  neutralizerTag,
  speedGatewayCode,
} from "../lib/demo-plant";
import { defaultCheckLimits, judgeCheck, STANDARD_PLATE } from "../lib/physics/neutralizer";
import { seedDemoGateway } from "./seed-gateway";
import { deviceSecretsFileName, generateDeviceSecret, hashDeviceSecret } from "../lib/device-secrets";
import { DEFAULT_PLANT_SETTINGS } from "../lib/plant-settings";

const SEED_MARKER = "seed.demo_plant";

export function deviceSecretsFile(dbName?: string): string {
  const env = getEnv();
  return path.resolve(env.DATA_DIR, deviceSecretsFileName(dbName ?? env.DB_NAME));
}

export async function isSeeded(db: Db): Promise<boolean> {
  const rows = await db.select({ key: s.settings.key }).from(s.settings).where(eq(s.settings.key, SEED_MARKER));
  return rows.length > 0;
}

export async function seedDemoPlant(db: Db, opts: { nowMs?: number; secretsFile?: string } = {}): Promise<{ seeded: boolean }> {
  if (await isSeeded(db)) {
    // an installation seeded before the demo gateway existed gets it now (db/seed-gateway.ts)
    await seedDemoGateway(db, opts.nowMs ?? Date.now(), { secretsFile: opts.secretsFile ?? deviceSecretsFile() });
    return { seeded: false };
  }
  const now = opts.nowMs ?? Date.now();
  const secrets: Record<string, string> = {};

  const newDevice = (code: string) => {
    const secret = generateDeviceSecret();
    secrets[code] = secret;
    return hashDeviceSecret(secret);
  };

  await db.transaction(async (tx) => {
    const areaIds = new Map<string, number>();
    for (const [i, a] of DEMO_AREAS.entries()) {
      const [res] = await tx.insert(s.areas).values({ ...a, displayOrder: i });
      areaIds.set(a.slug, res.insertId);
      await tx.insert(s.devices).values({
        code: loggerCode(a.slug),
        kind: "th_logger",
        label: `${a.name} temperature/humidity logger`,
        secretHash: newDevice(loggerCode(a.slug)),
        areaId: res.insertId,
        calibrationDue: "2027-03-31",
        createdAt: now,
      });
    }

    const calibrationDue = ["2027-01-15", "2026-12-10", "2027-05-01"];
    for (const [li, l] of DEMO_LINES.entries()) {
      const areaId = areaIds.get(l.areaSlug)!;
      const [lineRes] = await tx.insert(s.lines).values({
        areaId,
        slug: l.slug,
        name: l.name,
        kind: l.kind,
        nominalSpeedMpm: l.nominalSpeedMpm,
        material: l.material,
        solventName: l.solventName,
        solventMieMj: l.solventMieMj,
        conductorCapacitancePf: l.conductorCapacitancePf,
        displayOrder: li,
      });
      const lineId = lineRes.insertId;
      await tx.insert(s.devices).values({
        code: speedGatewayCode(l.slug),
        kind: "speed_gateway",
        label: `${l.name} speed gateway`,
        secretHash: newDevice(speedGatewayCode(l.slug)),
        lineId,
        areaId,
        createdAt: now,
      });
      for (const [pi, p] of l.points.entries()) {
        const [pointRes] = await tx.insert(s.points).values({ lineId, name: p.name, position: pi + 1 });
        const pointId = pointRes.insertId;
        await tx.insert(s.devices).values({
          code: fieldMeterCode(l.slug, p.slug),
          kind: "field_meter",
          label: `${l.name} — ${p.name} field meter`,
          secretHash: newDevice(fieldMeterCode(l.slug, p.slug)),
          pointId,
          lineId,
          areaId,
          // fixed sensors are calibrated to read at 25 mm (1 in) from the web (common practice)
          calibratedDistanceMm: 25,
          mountingDistanceMm: 25,
          calibrationDue: calibrationDue[(li + pi) % calibrationDue.length],
          createdAt: now,
        });
        // a neutralizer just upstream of each measuring point, of the kind the demo plant gives it
        const nz = demoNeutralizer(l.slug, p.slug);
        const [nzRes] = await tx.insert(s.neutralizers).values({
          tag: neutralizerTag(l.slug, p.slug),
          kind: nz.kind,
          lengthMm: nz.lengthMm,
          powerUnit: nz.powerUnit,
          outputKv: nz.outputKv,
          airAssisted: nz.airAssisted,
          mountingDistanceMm: nz.mountingDistanceMm,
          pointId,
          installedOn: "2024-03-04",
          cleaningIntervalDays: l.solventName ? 7 : 14,
          checkIntervalDays: 90,
          lastCleanedTs: now - ((li * 3 + pi * 2) % 12) * 86_400_000,
          state: "in_service",
        });
        // its charged-plate checks on the standard plate, judged against its kind's default limits
        for (const c of DEMO_CHECKS[`${l.slug}/${p.slug}`] ?? []) {
          const judgement = judgeCheck(c, defaultCheckLimits(nz.kind));
          const [checkRes] = await tx.insert(s.checks).values({
            neutralizerId: nzRes.insertId,
            ts: now - c.daysAgo * 86_400_000,
            method: "charged_plate",
            plateDistanceMm: c.plateDistanceMm,
            plateCapacitancePf: STANDARD_PLATE.capacitancePf,
            plateWidthMm: STANDARD_PLATE.widthMm,
            plateLengthMm: STANDARD_PLATE.lengthMm,
            decayPosS: c.decayPosS,
            decayNegS: c.decayNegS,
            offsetV: c.offsetV,
            instrument: "Charged-plate monitor CPM-1 (demo)",
            passed: judgement.pass,
            failReasons: judgement.failures.join(" ").slice(0, 300) || null,
            limitsUsed: JSON.stringify({ ...defaultCheckLimits(nz.kind), source: "default" }),
          });
          await tx.insert(s.equipmentEvents).values({
            subjectType: "neutralizer",
            subjectId: nzRes.insertId,
            ts: now - c.daysAgo * 86_400_000,
            kind: "check",
            text: `${judgement.pass ? "Passed" : "Failed"} charged-plate check.`,
            checkId: checkRes.insertId,
          });
        }
      }
    }

    // default limits: plant-wide charge and humidity rules (per point/line/area rules are added
    // by engineers in the Limits editor). Values are plant settings, not standards.
    const defaults: Array<{ kind: (typeof s.RULE_KINDS)[number]; name: string; severity: "low" | "medium" | "high"; onDelayS: number; offDelayS: number; onlyWhileRunning: boolean; params: Record<string, number | string> }> = [
      // the same figures as lib/rules/defaults.ts (plant settings from common practice, from memory; not published limits)
      { kind: "charge_high", name: "Charge over limit", severity: "medium", onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 12, clearKv: 10 } },
      { kind: "charge_high", name: "Charge far over limit", severity: "high", onDelayS: 10, offDelayS: 30, onlyWhileRunning: true, params: { limitKv: 20, clearKv: 17 } },
      { kind: "charge_rate", name: "Charge rising fast", severity: "medium", onDelayS: 30, offDelayS: 60, onlyWhileRunning: true, params: { rateKvPerMin: 3, clearRateKvPerMin: 1.5, windowS: 120 } },
      { kind: "rh_low", name: "Hall humidity low", severity: "medium", onDelayS: 120, offDelayS: 300, onlyWhileRunning: false, params: { limitPct: 30, clearPct: 33 } },
      { kind: "rh_forecast", name: "Hall humidity falling toward limit", severity: "low", onDelayS: 300, offDelayS: 600, onlyWhileRunning: false, params: { limitPct: 30, horizonMin: 60, windowMin: 30, clearMarginPct: 2 } },
      { kind: "sensor_silent", name: "Sensor silent", severity: "medium", onDelayS: 0, offDelayS: 60, onlyWhileRunning: false, params: { silentS: 120 } },
      { kind: "sensor_flat", name: "Sensor reading flat", severity: "low", onDelayS: 0, offDelayS: 60, onlyWhileRunning: true, params: { channel: "charge_kv", windowS: 600, tolerance: 0.05 } },
      { kind: "effect_loss", name: "Neutralizer losing effect", severity: "medium", onDelayS: 60, offDelayS: 2700, onlyWhileRunning: true, params: { minReductionFraction: 0.5, clearReductionFraction: 0.6, windowS: 300, minBeforeKv: 0.5 } },
    ];
    for (const d of defaults) {
      const [r] = await tx.insert(s.rules).values({ kind: d.kind, name: d.name, createdAt: now, currentVersion: 1 });
      await tx.insert(s.ruleVersions).values({
        ruleId: r.insertId,
        version: 1,
        severity: d.severity,
        onDelayS: d.onDelayS,
        offDelayS: d.offDelayS,
        onlyWhileRunning: d.onlyWhileRunning,
        params: d.params,
        createdAt: now,
        comment: "Demo default",
      });
    }

    await tx.insert(s.settings).values([
      { key: "plant", value: { name: DEMO_PLANT_NAME, ...DEFAULT_PLANT_SETTINGS, ...DEMO_PLANT_LOCATION }, updatedAt: now },
      { key: SEED_MARKER, value: { at: now }, updatedAt: now },
    ]);
  });

  // people (bcrypt hashing outside the transaction keeps it short)
  const ids: Record<string, number> = {};
  for (const p of DEMO_PEOPLE) {
    ids[p.email] = await createPerson(db, { email: p.email, name: p.name, role: p.role, password: p.password });
  }
  await db.update(s.people).set({ wantsDailyDigest: true }).where(eq(s.people.email, "engineer@harrowfen.example"));
  await db.update(s.people).set({ onMaintenanceList: true }).where(eq(s.people.email, "engineer@harrowfen.example"));

  // on-call roster: a rolling year of weekly rotations; first called, then escalation
  const weekMs = 7 * 86_400_000;
  const start = Math.floor(now / weekMs) * weekMs - weekMs;
  const rota = [ids["oncall@harrowfen.example"], ids["engineer@harrowfen.example"]];
  const rows: (typeof s.oncallShifts.$inferInsert)[] = [];
  for (let w = 0; w < 54; w++) {
    const first = rota[w % 2];
    const second = rota[(w + 1) % 2];
    rows.push({ personId: first, startTs: start + w * weekMs, endTs: start + (w + 1) * weekMs, escalationOrder: 1 });
    rows.push({ personId: second, startTs: start + w * weekMs, endTs: start + (w + 1) * weekMs, escalationOrder: 2 });
    rows.push({ personId: ids["admin@harrowfen.example"], startTs: start + w * weekMs, endTs: start + (w + 1) * weekMs, escalationOrder: 3 });
  }
  await db.insert(s.oncallShifts).values(rows);
  await seedDemoSurveys(db, now);
  await seedDemoGateway(db, now, { secrets });

  const file = opts.secretsFile ?? deviceSecretsFile();
  fs.mkdirSync(path.dirname(file), { recursive: true });
  fs.writeFileSync(file, JSON.stringify(secrets, null, 2), { mode: 0o600 });
  return { seeded: true };
}

/** Reads the demo devices' plain secrets written by the seed (for simulators and tests). */
export function readDeviceSecrets(dbName?: string): Record<string, string> {
  const file = deviceSecretsFile(dbName);
  if (!fs.existsSync(file)) throw new Error(`No device secrets at ${file}; run the seed first (npm run db:seed).`);
  return JSON.parse(fs.readFileSync(file, "utf8")) as Record<string, string>;
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  seedDemoPlant(getDb())
    .then(async (r) => {
      console.log(r.seeded ? `Seeded the demo plant (${DEMO_PLANT_NAME}).` : "Demo plant already seeded; nothing changed.");
      await closeDb();
    })
    .catch(async (err) => {
      console.error("Seed failed:", err instanceof Error ? err.message : err);
      await closeDb().catch(() => undefined);
      process.exit(1);
    });
}
