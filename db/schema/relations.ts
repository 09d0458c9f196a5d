// Drizzle relations between the tables. They mirror the foreign keys declared on the columns
// (`.references()` in the table files). They live in one file, not beside each table, because a
// relation names both ends: kept beside the tables, the plant and people files would import the
// alert and record files that already import them (an import cycle).
// On MariaDB, Drizzle's relational queries (`db.query.…({ with })`) fail: they use LATERAL joins,
// or derived tables that refer to the outer row, which MariaDB lacks. Read models therefore join
// explicitly (db/queries/*); the relations document the graph and are checked against the keys by
// tests/integration/schema-foreign-keys.test.ts. Polymorphic links (equipment_events, uploads and
// audit_log point at "a subject" by type and id) and the time-series tables have no foreign key
// and no relation here.
import { relations } from "drizzle-orm";
import { alertEvents, alerts, lineNotes, oncallShifts, ruleVersions, rules } from "./alerts";
import { deviceClocks, edgeNodes, gatewayDevices, gatewayMetrics, gatewayRejections } from "./gateways";
import { phoneOutbox, pushSubscriptions } from "./notify";
import { auditLog, people } from "./people";
import { areas, devices, lines, neutralizers, points } from "./plant";
import { checks, equipmentEvents, importedFiles, uploads } from "./records";
import { maintenanceWindows } from "./maintenance";
import { meterCrossChecks, surveyActions, surveyFindings, surveyPhotos, surveyPlanVersions, surveyPlans, surveyReadings, surveys } from "./surveys";

// ── the plant ────────────────────────────────────────────────────────────────────────────────

export const areasRelations = relations(areas, ({ many }) => ({
  lines: many(lines),
  devices: many(devices),
}));

export const linesRelations = relations(lines, ({ one, many }) => ({
  area: one(areas, { fields: [lines.areaId], references: [areas.id] }),
  points: many(points),
  devices: many(devices),
  notes: many(lineNotes),
  surveyPlans: many(surveyPlans),
}));

export const pointsRelations = relations(points, ({ one, many }) => ({
  line: one(lines, { fields: [points.lineId], references: [lines.id] }),
  devices: many(devices),
  neutralizers: many(neutralizers),
}));

export const devicesRelations = relations(devices, ({ one }) => ({
  point: one(points, { fields: [devices.pointId], references: [points.id] }),
  area: one(areas, { fields: [devices.areaId], references: [areas.id] }),
  line: one(lines, { fields: [devices.lineId], references: [lines.id] }),
  clock: one(deviceClocks, { fields: [devices.id], references: [deviceClocks.deviceId] }),
}));

export const neutralizersRelations = relations(neutralizers, ({ one, many }) => ({
  point: one(points, { fields: [neutralizers.pointId], references: [points.id] }),
  checks: many(checks),
}));

// ── people ───────────────────────────────────────────────────────────────────────────────────

export const peopleRelations = relations(people, ({ many }) => ({
  oncallShifts: many(oncallShifts),
  lineNotes: many(lineNotes),
  auditEntries: many(auditLog),
}));

export const auditLogRelations = relations(auditLog, ({ one }) => ({
  person: one(people, { fields: [auditLog.personId], references: [people.id] }),
}));

// ── rules and alerts ─────────────────────────────────────────────────────────────────────────

export const rulesRelations = relations(rules, ({ one, many }) => ({
  point: one(points, { fields: [rules.pointId], references: [points.id] }),
  line: one(lines, { fields: [rules.lineId], references: [lines.id] }),
  area: one(areas, { fields: [rules.areaId], references: [areas.id] }),
  device: one(devices, { fields: [rules.deviceId], references: [devices.id] }),
  neutralizer: one(neutralizers, { fields: [rules.neutralizerId], references: [neutralizers.id] }),
  versions: many(ruleVersions),
  alerts: many(alerts),
}));

export const ruleVersionsRelations = relations(ruleVersions, ({ one }) => ({
  rule: one(rules, { fields: [ruleVersions.ruleId], references: [rules.id] }),
  createdByPerson: one(people, { fields: [ruleVersions.createdBy], references: [people.id] }),
}));

export const alertsRelations = relations(alerts, ({ one, many }) => ({
  rule: one(rules, { fields: [alerts.ruleId], references: [rules.id] }),
  area: one(areas, { fields: [alerts.areaId], references: [areas.id] }),
  line: one(lines, { fields: [alerts.lineId], references: [lines.id] }),
  point: one(points, { fields: [alerts.pointId], references: [points.id] }),
  device: one(devices, { fields: [alerts.deviceId], references: [devices.id] }),
  neutralizer: one(neutralizers, { fields: [alerts.neutralizerId], references: [neutralizers.id] }),
  ackedByPerson: one(people, { fields: [alerts.ackedBy], references: [people.id] }),
  events: many(alertEvents),
}));

export const alertEventsRelations = relations(alertEvents, ({ one }) => ({
  alert: one(alerts, { fields: [alertEvents.alertId], references: [alerts.id] }),
  person: one(people, { fields: [alertEvents.personId], references: [people.id] }),
}));

export const oncallShiftsRelations = relations(oncallShifts, ({ one }) => ({
  person: one(people, { fields: [oncallShifts.personId], references: [people.id] }),
}));

export const lineNotesRelations = relations(lineNotes, ({ one }) => ({
  line: one(lines, { fields: [lineNotes.lineId], references: [lines.id] }),
  point: one(points, { fields: [lineNotes.pointId], references: [points.id] }),
  person: one(people, { fields: [lineNotes.personId], references: [people.id] }),
}));

// ── equipment records ────────────────────────────────────────────────────────────────────────

export const checksRelations = relations(checks, ({ one }) => ({
  neutralizer: one(neutralizers, { fields: [checks.neutralizerId], references: [neutralizers.id] }),
  person: one(people, { fields: [checks.personId], references: [people.id] }),
}));

export const equipmentEventsRelations = relations(equipmentEvents, ({ one }) => ({
  person: one(people, { fields: [equipmentEvents.personId], references: [people.id] }),
  check: one(checks, { fields: [equipmentEvents.checkId], references: [checks.id] }),
  upload: one(uploads, { fields: [equipmentEvents.uploadId], references: [uploads.id] }),
}));

export const uploadsRelations = relations(uploads, ({ one }) => ({
  person: one(people, { fields: [uploads.personId], references: [people.id] }),
}));

export const importedFilesRelations = relations(importedFiles, ({ one }) => ({
  person: one(people, { fields: [importedFiles.personId], references: [people.id] }),
}));

// ── surveys ──────────────────────────────────────────────────────────────────────────────────

export const surveyPlansRelations = relations(surveyPlans, ({ one, many }) => ({
  line: one(lines, { fields: [surveyPlans.lineId], references: [lines.id] }),
  versions: many(surveyPlanVersions),
  surveys: many(surveys),
}));

export const surveyPlanVersionsRelations = relations(surveyPlanVersions, ({ one }) => ({
  plan: one(surveyPlans, { fields: [surveyPlanVersions.planId], references: [surveyPlans.id] }),
  person: one(people, { fields: [surveyPlanVersions.personId], references: [people.id] }),
}));

export const surveysRelations = relations(surveys, ({ one, many }) => ({
  plan: one(surveyPlans, { fields: [surveys.planId], references: [surveyPlans.id] }),
  line: one(lines, { fields: [surveys.lineId], references: [lines.id] }),
  person: one(people, { fields: [surveys.personId], references: [people.id] }),
  resurveyOfAction: one(surveyActions, { fields: [surveys.resurveyOfActionId], references: [surveyActions.id], relationName: "resurvey_of_action" }),
  readings: many(surveyReadings),
  photos: many(surveyPhotos),
  findings: many(surveyFindings),
  actions: many(surveyActions, { relationName: "survey_actions" }),
  crossChecks: many(meterCrossChecks),
}));

export const surveyReadingsRelations = relations(surveyReadings, ({ one }) => ({
  survey: one(surveys, { fields: [surveyReadings.surveyId], references: [surveys.id] }),
  point: one(points, { fields: [surveyReadings.pointId], references: [points.id] }),
  fixedDevice: one(devices, { fields: [surveyReadings.fixedDeviceId], references: [devices.id] }),
}));

export const surveyPhotosRelations = relations(surveyPhotos, ({ one }) => ({
  survey: one(surveys, { fields: [surveyPhotos.surveyId], references: [surveys.id] }),
  person: one(people, { fields: [surveyPhotos.personId], references: [people.id] }),
}));

export const surveyFindingsRelations = relations(surveyFindings, ({ one, many }) => ({
  survey: one(surveys, { fields: [surveyFindings.surveyId], references: [surveys.id] }),
  actions: many(surveyActions),
}));

export const surveyActionsRelations = relations(surveyActions, ({ one }) => ({
  survey: one(surveys, { fields: [surveyActions.surveyId], references: [surveys.id], relationName: "survey_actions" }),
  finding: one(surveyFindings, { fields: [surveyActions.findingId], references: [surveyFindings.id] }),
  owner: one(people, { fields: [surveyActions.ownerId], references: [people.id], relationName: "action_owner" }),
  createdByPerson: one(people, { fields: [surveyActions.createdBy], references: [people.id], relationName: "action_created_by" }),
  closedByPerson: one(people, { fields: [surveyActions.closedBy], references: [people.id], relationName: "action_closed_by" }),
  resurvey: one(surveys, { fields: [surveyActions.resurveyId], references: [surveys.id], relationName: "action_resurvey" }),
}));

export const meterCrossChecksRelations = relations(meterCrossChecks, ({ one }) => ({
  device: one(devices, { fields: [meterCrossChecks.deviceId], references: [devices.id] }),
  survey: one(surveys, { fields: [meterCrossChecks.surveyId], references: [surveys.id] }),
  reading: one(surveyReadings, { fields: [meterCrossChecks.readingId], references: [surveyReadings.id] }),
}));

// ── gateways ─────────────────────────────────────────────────────────────────────────────────

export const edgeNodesRelations = relations(edgeNodes, ({ many }) => ({
  devices: many(gatewayDevices),
  metrics: many(gatewayMetrics),
  rejections: many(gatewayRejections),
}));

export const gatewayDevicesRelations = relations(gatewayDevices, ({ one }) => ({
  edgeNode: one(edgeNodes, { fields: [gatewayDevices.edgeNodeId], references: [edgeNodes.id] }),
}));

export const gatewayMetricsRelations = relations(gatewayMetrics, ({ one }) => ({
  edgeNode: one(edgeNodes, { fields: [gatewayMetrics.edgeNodeId], references: [edgeNodes.id] }),
  targetDevice: one(devices, { fields: [gatewayMetrics.targetDeviceId], references: [devices.id] }),
  mappedByPerson: one(people, { fields: [gatewayMetrics.mappedBy], references: [people.id] }),
}));

export const gatewayRejectionsRelations = relations(gatewayRejections, ({ one }) => ({
  edgeNode: one(edgeNodes, { fields: [gatewayRejections.edgeNodeId], references: [edgeNodes.id] }),
}));

export const deviceClocksRelations = relations(deviceClocks, ({ one }) => ({
  device: one(devices, { fields: [deviceClocks.deviceId], references: [devices.id] }),
  changedByPerson: one(people, { fields: [deviceClocks.changedBy], references: [people.id] }),
}));

// ── messages to phones ──────────────────────────────────────────────────────────────────────

export const phoneOutboxRelations = relations(phoneOutbox, ({ one }) => ({
  person: one(people, { fields: [phoneOutbox.personId], references: [people.id] }),
  alert: one(alerts, { fields: [phoneOutbox.alertId], references: [alerts.id] }),
}));

export const pushSubscriptionsRelations = relations(pushSubscriptions, ({ one }) => ({
  person: one(people, { fields: [pushSubscriptions.personId], references: [people.id] }),
}));

// ── planned work ────────────────────────────────────────────────────────────────────────────

export const maintenanceWindowsRelations = relations(maintenanceWindows, ({ one }) => ({
  owner: one(people, { fields: [maintenanceWindows.ownerId], references: [people.id] }),
  createdByPerson: one(people, { fields: [maintenanceWindows.createdBy], references: [people.id] }),
}));
