// The demo plant as the rules engine sees it, with ids as a fresh database would give them
// (areas, lines and points in lib/demo-plant.ts order; a neutralizer at every point after the
// first, judged between the meter before and after it), the edge nodes the devices report
// through, and the subjects an incident of simulators/ground-truth.ts touches. Used where no
// database is at hand (`npm run bench:alerts`).
import { DEMO_AREAS, DEMO_LINES, fieldMeterCode, loggerCode, speedGatewayCode } from "../lib/demo-plant";
import type { DependencyParent } from "../lib/alerts/dependency-hold";
import { subjectKeyOfParent } from "../lib/alerts/dependency-hold";
import { subjectKeyOfArea, subjectKeyOfNeutralizer, subjectKeyOfPoint, subjectKeyOfSensor } from "../lib/rules/evaluators";
import type { Topology } from "../lib/rules/types";
import type { GroundTruthIncident } from "./ground-truth";
import { demoDeviceCodes, demoEdgeNodes } from "./incident-schedule";

export type DemoTopology = {
  topology: Topology;
  parents: DependencyParent[];
  pointId: (lineSlug: string, pointSlug: string) => number;
  neutralizerId: (lineSlug: string, pointSlug: string) => number | null;
  areaId: (areaSlug: string) => number;
  lineCount: number;
  subjectsOf: (incident: GroundTruthIncident) => string[];
};

export function buildDemoTopology(): DemoTopology {
  const topology: Topology = { areas: [], lines: [], points: [], neutralizers: [] };
  const pointIds = new Map<string, number>();
  const neutralizerIds = new Map<string, number>();
  DEMO_AREAS.forEach((a, i) => topology.areas.push({ areaId: i + 1, name: a.name, climateSensorKey: loggerCode(a.slug) }));
  let pointId = 1;
  let neutralizerId = 1;
  DEMO_LINES.forEach((l, i) => {
    const ids: number[] = [];
    l.points.forEach((p, k) => {
      topology.points.push({ pointId, name: `${l.name} ${p.name}`, fieldMeterSensorKey: fieldMeterCode(l.slug, p.slug) });
      pointIds.set(`${l.slug}/${p.slug}`, pointId);
      if (k > 0) {
        topology.neutralizers.push({ neutralizerId, name: `${l.slug}/${p.slug}`, beforePointId: pointId - 1, afterPointId: pointId });
        neutralizerIds.set(`${l.slug}/${p.slug}`, neutralizerId++);
      }
      ids.push(pointId++);
    });
    const areaId = DEMO_AREAS.findIndex((a) => a.slug === l.areaSlug) + 1;
    topology.lines.push({ lineId: i + 1, areaId, name: l.name, pointIds: ids, runningSensorKey: speedGatewayCode(l.slug), speedSensorKey: speedGatewayCode(l.slug) });
  });
  const nodes = demoEdgeNodes();
  const parents: DependencyParent[] = [
    ...nodes.map((n) => ({ key: n.key, name: n.name, kind: "edge_node" as const, sensorKeys: n.codes, lineId: DEMO_LINES.findIndex((l) => l.slug === n.lineSlug) + 1 })),
    { key: "feed", name: "The data feed (broker or worker)", kind: "feed", sensorKeys: demoDeviceCodes() },
  ];
  const lineSubjects = (lineSlug: string) => {
    const line = DEMO_LINES.find((l) => l.slug === lineSlug)!;
    return line.points.flatMap((p) => {
      const n = neutralizerIds.get(`${lineSlug}/${p.slug}`);
      return [subjectKeyOfPoint(pointIds.get(`${lineSlug}/${p.slug}`)!), subjectKeyOfSensor(fieldMeterCode(lineSlug, p.slug)), ...(n ? [subjectKeyOfNeutralizer(n)] : [])];
    }).concat(subjectKeyOfSensor(speedGatewayCode(lineSlug)));
  };
  const subjectsOf = (inc: GroundTruthIncident): string[] => {
    const w = inc.where;
    switch (inc.kind) {
      case "humidity_drop": {
        const areaId = DEMO_AREAS.findIndex((a) => a.slug === w.areaSlug) + 1;
        return [subjectKeyOfArea(areaId), subjectKeyOfSensor(loggerCode(w.areaSlug!))];
      }
      case "fouling_bar":
      case "power_unit_fault":
      case "speed_up":
        // the bar, and the charge it lets through downstream on the same line
        return lineSubjects(w.lineSlug!);
      case "silent_sensor":
      case "dead_gateway": {
        const codes = w.deviceCodes ?? [];
        const points = topology.points.filter((p) => p.fieldMeterSensorKey !== null && codes.includes(p.fieldMeterSensorKey));
        return [...codes.map(subjectKeyOfSensor), ...points.map((p) => subjectKeyOfPoint(p.pointId)), ...(w.gatewayKey ? [subjectKeyOfParent(w.gatewayKey)] : []), subjectKeyOfParent("feed")];
      }
    }
  };
  return {
    topology,
    parents,
    pointId: (l, p) => pointIds.get(`${l}/${p}`)!,
    neutralizerId: (l, p) => neutralizerIds.get(`${l}/${p}`) ?? null,
    areaId: (slug) => DEMO_AREAS.findIndex((a) => a.slug === slug) + 1,
    lineCount: DEMO_LINES.length,
    subjectsOf,
  };
}
