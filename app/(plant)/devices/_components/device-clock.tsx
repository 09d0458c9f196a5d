// The clock part of the Devices pages: the skew between a device's reading times and their
// arrival (measured by the ingest worker), flagged past CLOCK_SKEW_LIMIT_MS (lib/settings.ts; 30 s by default), and the
// engineer's choice of keeping device time or arrival time for its readings.
import { StateBadge } from "@/components/ui/state-badge";
import { Card } from "@/components/ui/page";
import { describeSkew, isClockOff, TIME_SOURCE_LABELS, type TimeSource } from "@/lib/clock-skew";
import { getSettings } from "@/lib/settings";
import { TimeSourceForm } from "../../gateways/_components/gateway-forms";

export type ClockView = { skewMs: number | null; measuredTs: number | null; timeSource: TimeSource } | undefined;

/** A small flag for the device list: shown only when the clock is off. */
export function ClockFlag({ clock }: { clock: ClockView }) {
  const limitMs = getSettings().CLOCK_SKEW_LIMIT_MS;
  if (!clock || !isClockOff(clock.skewMs, limitMs)) return null;
  return (
    <span className="ml-2" data-testid="clock-off" title={`Readings carry times ${describeSkew(clock.skewMs!)} the server's clock; limit ${limitMs / 1000} s`}>
      <StateBadge state="near" label={`Clock ${describeSkew(clock.skewMs!)}`} />
    </span>
  );
}

export function DeviceClockCard({ deviceId, clock, mayEdit }: { deviceId: number; clock: ClockView; mayEdit: boolean }) {
  const limitMs = getSettings().CLOCK_SKEW_LIMIT_MS;
  const off = isClockOff(clock?.skewMs, limitMs);
  return (
    <Card title="Clock" aside={<span className="text-xs text-ink-faint">flagged past {limitMs / 1000} s</span>}>
      <p className="text-sm" data-testid="device-clock">
        {clock?.skewMs === null || clock?.skewMs === undefined ? (
          <span className="text-ink-faint">Not measured yet (needs live readings).</span>
        ) : off ? (
          <StateBadge state="near" label={`Clock off: ${describeSkew(clock.skewMs)}`} />
        ) : (
          <span>In step: {describeSkew(clock.skewMs)}</span>
        )}
      </p>
      <div className="mt-3 text-sm">
        {mayEdit ? (
          <TimeSourceForm deviceId={deviceId} value={clock?.timeSource ?? "device"} />
        ) : (
          <span className="text-ink-soft">Readings keep: {TIME_SOURCE_LABELS[clock?.timeSource ?? "device"]}</span>
        )}
      </div>
    </Card>
  );
}
