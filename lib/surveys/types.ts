/**
 * View types of walk-down surveys, shared by the read models (db/queries/surveys*.ts) and the
 * UI (components/surveys, app/(plant)/surveys) so client code never names db/.
 */
import type { FindingKind } from "./findings";
import type { MeterUnit } from "./judge";
import type { PlanSpot, SurveyActionKind } from "./schemas";

export type SurveyLinePoint = { id: number; name: string; position: number; fixedMeterId: number | null; fixedMeterCode: string | null; neutralizerTag: string | null };

export type SurveyLineOption = {
  id: number;
  name: string;
  areaName: string;
  /** no fixed field meter on the line: it is watched by surveys only */
  surveyOnly: boolean;
  solventName: string | null;
  points: SurveyLinePoint[];
};

export type SurveyPlanSummary = {
  id: number;
  lineId: number;
  lineName: string;
  areaName: string;
  surveyOnly: boolean;
  name: string;
  currentVersion: number;
  spotCount: number;
  surveyCount: number;
  lastSurveyTs: number | null;
};

export type RoundSpot = PlanSpot & {
  position: number;
  limitKv: number | null;
  /** the same spot in the last finished survey of this plan */
  last: { equivalentKv: number; ts: number } | null;
  fixedMeter: { deviceId: number; code: string } | null;
};

export type RoundPlan = {
  planId: number;
  planName: string;
  version: number;
  lineId: number;
  lineName: string;
  areaName: string;
  solventName: string | null;
  spots: RoundSpot[];
};

export type SurveyReadingView = {
  id: number;
  spotKey: string;
  ts: number;
  enteredValue: number;
  unit: MeterUnit;
  readKv: number;
  distanceMm: number;
  equivalentKv: number;
  running: boolean;
  speedMpm: number | null;
  note: string | null;
  fixedKv: number | null;
  fixedCode: string | null;
  photoId: number | null;
};

export type SurveyFindingView = {
  id: number;
  kind: FindingKind;
  spotKey: string;
  fromSpotKey: string | null;
  valueKv: number;
  limitKv: number | null;
  reductionPct: number | null;
  text: string;
};

export type SurveyActionView = {
  id: number;
  surveyId: number;
  findingId: number | null;
  kind: SurveyActionKind;
  text: string;
  ownerId: number;
  ownerName: string;
  dueDate: string;
  state: "open" | "closed";
  createdTs: number;
  closedTs: number | null;
  closeNote: string | null;
  resurveyId: number | null;
  lineName: string;
  planId: number;
};

export type CrossCheckView = {
  id: number;
  deviceId: number;
  deviceCode: string;
  surveyId: number;
  ts: number;
  handheldKv: number;
  fixedKv: number;
  diffShare: number;
  allowedShare: number;
  flagged: boolean;
};

export type SurveyReport = {
  id: number;
  clientId: string;
  planId: number;
  planName: string;
  planVersion: number;
  currentPlanVersion: number;
  lineId: number;
  lineName: string;
  areaName: string;
  solventName: string | null;
  personName: string | null;
  startedTs: number;
  finishedTs: number | null;
  meterLabel: string;
  meterCalibratedOn: string | null;
  calibratedDistanceMm: number;
  note: string | null;
  resurveyOfActionId: number | null;
  spots: (PlanSpot & { position: number; limitKv: number | null; reading: SurveyReadingView | null; reductionPct: number | null })[];
  findings: SurveyFindingView[];
  actions: SurveyActionView[];
  crossChecks: CrossCheckView[];
};

export type SurveyListItem = {
  id: number;
  planId: number;
  planName: string;
  planVersion: number;
  lineName: string;
  personName: string | null;
  startedTs: number;
  finishedTs: number | null;
  readingCount: number;
  findingCount: number;
  openActionCount: number;
  resurveyOfActionId: number | null;
};
