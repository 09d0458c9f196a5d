// CSV import actions: preview (detected delimiter, header, columns, units, first rows) and
// import (with the columns as mapped by the person). Parsing is lib/csv-import.ts; storing is
// db/queries/imports.ts. Route handlers call these with multipart form data.
import "server-only";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getEnv } from "@/db/env";
import { writeAudit } from "@/db/queries/audit";
import { getPlantSettings } from "@/db/queries/equipment";
import { findHallLogger, findImportsOfFile, importCheckLog, importHumidityLog, sha256Hex } from "@/db/queries/imports";
import { analyzeCsv, FIELDS_BY_KIND, IMPORT_KINDS, parseCsv, UNIT_CHOICES, type CsvAnalysis, type CsvOptions, type Mapping, type Units } from "@/lib/csv-import";
import { AppError, badInput } from "@/lib/errors";
import { defineAction } from "../action";

export const MAX_CSV_BYTES = 20 * 1024 * 1024;

const jsonField = <S extends z.ZodType>(schema: S) =>
  z.preprocess((v) => {
    if (v === undefined || v === "" || v === null) return undefined;
    if (typeof v !== "string") return v;
    try {
      return JSON.parse(v);
    } catch {
      return Symbol("invalid json");
    }
  }, schema.optional());

const fieldNames = [...new Set([...FIELDS_BY_KIND.check_log, ...FIELDS_BY_KIND.humidity_log])] as [string, ...string[]];
const mappingSchema = z.partialRecord(z.enum(fieldNames), z.number().int().min(-1).max(500).nullable());
const unitsSchema = z
  .object({
    decayPos: z.enum(UNIT_CHOICES.decayPos),
    decayNeg: z.enum(UNIT_CHOICES.decayNeg),
    offset: z.enum(UNIT_CHOICES.offset),
    plateDistance: z.enum(UNIT_CHOICES.plateDistance),
    temp: z.enum(UNIT_CHOICES.temp),
    rh: z.enum(UNIT_CHOICES.rh),
  })
  .partial();

const importSchema = z.object({
  kind: z.enum(IMPORT_KINDS, { message: "Choose what the file holds" }),
  file: z.instanceof(File, { message: "Choose a CSV file" }),
  areaId: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.coerce.number().int().positive().nullable()).default(null),
  mapping: jsonField(mappingSchema),
  units: jsonField(unitsSchema),
  dateOrder: z.preprocess((v) => (v === "" ? undefined : v), z.enum(["dmy", "mdy"]).optional()),
});

type ImportInput = z.infer<typeof importSchema>;

async function readCsvText(file: File): Promise<{ text: string; sha256: string }> {
  if (file.size > MAX_CSV_BYTES) throw new AppError("unprocessable", "The file is larger than 20 MB; split it and import the parts.", { file: ["At most 20 MB"] });
  const bytes = new Uint8Array(await file.arrayBuffer());
  if (bytes.includes(0)) throw new AppError("unprocessable", "This is not a text (CSV) file.", { file: ["Not a CSV file"] });
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    // older instruments write Windows-1252 ("°" as one byte); the BOM is kept for the analysis
    text = new TextDecoder("windows-1252", { ignoreBOM: true }).decode(bytes);
  }
  return { text, sha256: sha256Hex(bytes) };
}

function options(input: ImportInput, timeZone: string): CsvOptions {
  return { timeZone, mapping: input.mapping as Mapping | undefined, units: input.units as Partial<Units> | undefined, dateOrder: input.dateOrder };
}

export type ImportPreview = {
  analysis: CsvAnalysis;
  fileName: string;
  previousImports: { createdTs: number; personName: string | null; rowsImported: number }[];
  logger: { id: number; code: string } | null;
  rawRetentionDays: number;
  timeZone: string;
};

export const previewImportAction = defineAction("import.run", importSchema, async (input): Promise<ImportPreview> => {
  const db = getDb();
  const { text, sha256 } = await readCsvText(input.file);
  const plant = await getPlantSettings(db);
  const analysis = analyzeCsv(input.kind, text, options(input, plant.timeZone));
  const previous = await findImportsOfFile(db, input.kind, sha256);
  const logger = input.kind === "humidity_log" && input.areaId !== null ? await findHallLogger(db, input.areaId) : null;
  return {
    analysis,
    fileName: input.file.name,
    previousImports: previous.map((p) => ({ createdTs: p.createdTs, personName: p.personName, rowsImported: p.rowsImported })),
    logger,
    rawRetentionDays: getEnv().RAW_RETENTION_DAYS,
    timeZone: plant.timeZone,
  };
});

export const runImportAction = defineAction("import.run", importSchema, async (input, session) => {
  const db = getDb();
  const { text, sha256 } = await readCsvText(input.file);
  const plant = await getPlantSettings(db);
  const fileName = input.file.name.split(/[/\\]/).pop()?.slice(0, 200) || "import.csv";
  if (input.kind === "check_log") {
    const parsed = parseCsv("check_log", text, options(input, plant.timeZone));
    if (parsed.analysis.fileErrors.length) throw new AppError("unprocessable", parsed.analysis.fileErrors.join(" "), { mapping: parsed.analysis.fileErrors });
    const result = await importCheckLog(db, parsed, { name: fileName, sha256 }, session.personId);
    await writeAudit(db, { personId: session.personId, action: "import.check_log", subjectType: "import", subjectId: sha256.slice(0, 16), summary: `Imported check log ${fileName}: ${result.imported} new, ${result.duplicates} already there, ${result.rejected.length} rejected` });
    return { kind: "check_log" as const, fileName, ...result };
  }
  if (input.areaId === null) throw badInput("Please correct the marked fields.", { areaId: ["Choose the hall the logger was in"] });
  const logger = await findHallLogger(db, input.areaId);
  if (!logger) throw badInput("Please correct the marked fields.", { areaId: ["This hall has no temperature/humidity logger; add one on the Devices page first"] });
  const parsed = parseCsv("humidity_log", text, options(input, plant.timeZone));
  if (parsed.analysis.fileErrors.length) throw new AppError("unprocessable", parsed.analysis.fileErrors.join(" "), { mapping: parsed.analysis.fileErrors });
  const result = await importHumidityLog(db, parsed, { areaId: input.areaId }, { name: fileName, sha256 }, session.personId, { rawRetentionDays: getEnv().RAW_RETENTION_DAYS });
  await writeAudit(db, {
    personId: session.personId,
    action: "import.humidity_log",
    subjectType: "device",
    subjectId: logger.id,
    summary: `Imported humidity history ${fileName} into ${logger.code}: ${result.rowsImported} rows new, ${result.duplicates} values already there, ${result.rejected.length} rejected`,
  });
  return { kind: "humidity_log" as const, fileName, ...result };
});
