"use client";
// A clock that ticks every `everyMs`, corrected to the server's time (offset from the live
// stream), so "silent since" and "last 15 minutes" agree with the readings' own timestamps.
// `initialTs` (the server's render time) keeps the first client render equal to the HTML.
import { useEffect, useState } from "react";

export function useNow(everyMs = 1_000, offsetMs = 0, initialTs?: number): number {
  const [now, setNow] = useState(() => initialTs ?? Date.now() + offsetMs);
  useEffect(() => {
    // eslint-disable-next-line react-hooks/set-state-in-effect -- switch from the server's render time to the corrected client clock right after hydration
    setNow(Date.now() + offsetMs);
    const t = setInterval(() => setNow(Date.now() + offsetMs), everyMs);
    return () => clearInterval(t);
  }, [everyMs, offsetMs]);
  return now;
}
