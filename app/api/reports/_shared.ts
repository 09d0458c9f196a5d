// Shared by the report route handlers: CSV responses and resolving a report's defaults.
import "server-only";
import { NextResponse } from "next/server";
import type { CsvFile } from "@/lib/reports/csv-tables";

export function csvResponse(file: CsvFile): Response {
  return new Response(file.csv, {
    status: 200,
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="${file.filename.replace(/[^A-Za-z0-9._-]/g, "_")}"`,
      "cache-control": "no-store",
      "x-content-type-options": "nosniff",
    },
  });
}

export function jsonResponse(body: unknown): Response {
  return NextResponse.json(body, { headers: { "cache-control": "no-store" } });
}
