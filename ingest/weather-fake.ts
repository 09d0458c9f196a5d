// A local stand-in for the weather service, for the demo and the tests: answers the forecast
// SDK's request (openmeteo's fetchWeatherApi: GET <url>?latitude=…&longitude=…&hourly=…&format=flatbuffers)
// with a scripted hourly forecast, written as the SDK's FlatBuffers WeatherApiResponse (size-
// prefixed) with the flatbuffers package's Builder. The script: mild, damp air today (9–13 °C,
// 95 %); tomorrow a cold snap (−9 °C at 06:00 UTC, 62 %) from about 03:00 to 09:00 UTC.
// Field slots follow the SDK's readers (@openmeteo/sdk): response latitude 0, longitude 1,
// utc_offset_seconds 6, hourly 11; VariablesWithTime time 0, time_end 1, interval 2,
// variables 3; VariableWithValues variable 0, unit 1, values 3, altitude 5.
import http from "node:http";
import path from "node:path";
import * as flatbuffers from "flatbuffers";
import { getSettings } from "../lib/settings";
import { createLogger, describeError } from "./log";

const log = createLogger("weather-fake");
const VAR_TEMPERATURE = 47;
const VAR_RELATIVE_HUMIDITY = 29;
const UNIT_CELSIUS = 1;
const UNIT_PERCENTAGE = 35;

/** The scripted forecast: 48 hours from today's 00:00 UTC; the cold snap is tomorrow. */
export function scriptedForecast(nowMs: number): { startS: number; temps: number[]; rhs: number[] } {
  const day0 = Math.floor(nowMs / 86_400_000) * 86_400_000;
  const temps: number[] = [];
  const rhs: number[] = [];
  for (let i = 0; i < 48; i++) {
    const hourOfDay = i % 24;
    const tomorrow = i >= 24;
    // the snap: a V down to −9 °C at 06:00, climbing 3.5 °C an hour either side, back to normal by about noon
    const base = 11 + 2 * Math.sin(((hourOfDay - 9) / 24) * 2 * Math.PI);
    const temp = tomorrow && hourOfDay >= 1 && hourOfDay <= 12 ? Math.min(base, -9 + Math.abs(hourOfDay - 6) * 3.5) : base;
    temps.push(Number(temp.toFixed(1)));
    rhs.push(temp < 3 ? 62 : 95);
  }
  return { startS: day0 / 1000, temps, rhs };
}

function variable(b: flatbuffers.Builder, variableId: number, unit: number, values: number[], altitude: number): number {
  // float32 vector
  b.startVector(4, values.length, 4);
  for (let i = values.length - 1; i >= 0; i--) b.addFloat32(values[i]);
  const vec = b.endVector();
  b.startObject(6);
  b.addFieldInt8(0, variableId, 0);
  b.addFieldInt8(1, unit, 0);
  b.addFieldOffset(3, vec, 0);
  b.addFieldInt16(5, altitude, 0);
  return b.endObject();
}

/** One size-prefixed WeatherApiResponse holding the hourly temperature_2m and relative_humidity_2m. */
export function buildForecastResponse(lat: number, lon: number, f: ReturnType<typeof scriptedForecast>): Uint8Array {
  const b = new flatbuffers.Builder(1024);
  const t = variable(b, VAR_TEMPERATURE, UNIT_CELSIUS, f.temps, 2);
  const rh = variable(b, VAR_RELATIVE_HUMIDITY, UNIT_PERCENTAGE, f.rhs, 2);
  b.startVector(4, 2, 4);
  b.addOffset(rh);
  b.addOffset(t);
  const vars = b.endVector();
  b.startObject(4);
  b.addFieldInt64(0, BigInt(f.startS), BigInt(0));
  b.addFieldInt64(1, BigInt(f.startS + f.temps.length * 3600), BigInt(0));
  b.addFieldInt32(2, 3600, 0);
  b.addFieldOffset(3, vars, 0);
  const hourly = b.endObject();
  b.startObject(12);
  b.addFieldFloat32(0, lat, 0);
  b.addFieldFloat32(1, lon, 0);
  b.addFieldInt32(6, 0, 0);
  b.addFieldOffset(11, hourly, 0);
  b.finishSizePrefixed(b.endObject());
  return b.asUint8Array();
}

export function startWeatherFake(port: number, clock: () => number = Date.now) {
  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? "/", "http://fake.local");
    if (req.method !== "GET" || url.pathname !== "/v1/forecast") return void res.writeHead(404).end();
    const lat = Number(url.searchParams.get("latitude"));
    const lon = Number(url.searchParams.get("longitude"));
    if (!Number.isFinite(lat) || !Number.isFinite(lon) || url.searchParams.get("format") !== "flatbuffers") {
      res.writeHead(400, { "content-type": "application/json" }).end(JSON.stringify({ error: true, reason: "latitude, longitude and format=flatbuffers are required" }));
      return;
    }
    const body = buildForecastResponse(lat, lon, scriptedForecast(clock()));
    res.writeHead(200, { "content-type": "application/octet-stream", "content-length": body.length }).end(Buffer.from(body));
  });
  return new Promise<{ port: number; close: () => Promise<void> }>((resolve) =>
    server.listen(port, "127.0.0.1", () => {
      const a = server.address();
      resolve({ port: typeof a === "object" && a ? a.port : port, close: () => new Promise<void>((r) => server.close(() => r())) });
    }),
  );
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === path.resolve(import.meta.filename);
if (isMain) {
  startWeatherFake(getSettings().WEATHER_FAKE_PORT)
    .then((f) => {
      log.info(`fake weather service on 127.0.0.1:${f.port}`);
      const stop = () => void f.close().then(() => process.exit(0));
      process.on("SIGTERM", stop);
      process.on("SIGINT", stop);
    })
    .catch((err: unknown) => {
      log.error("could not start", { error: describeError(err) });
      process.exit(1);
    });
}
