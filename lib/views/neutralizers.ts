// A neutralizer's settings as the equipment form sends them and the database layer writes them
// (db/queries/neutralizers.ts, app/(plant)/equipment/_components/neutralizer-form.tsx).
import type { NeutralizerKind } from "../physics/neutralizer-kinds";
import type { NeutralizerState } from "../vocabulary/neutralizer-states";

export type NeutralizerWrite = {
  tag: string;
  kind: NeutralizerKind;
  lengthMm: number | null;
  powerUnit: string | null;
  outputKv: number | null;
  airAssisted: boolean;
  mountingDistanceMm: number | null;
  pointId: number | null;
  installedOn: string | null;
  cleaningIntervalDays: number;
  checkIntervalDays: number;
  state: NeutralizerState;
  notes: string | null;
};
