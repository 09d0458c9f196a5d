// A client of Mosquitto's dynamic-security plugin: JSON commands published on
// `$CONTROL/dynamic-security/v1`, answers read from `…/v1/response` (the plugin's documented
// control topic). Commands go out in small groups and each answer is matched to its command by
// position and name; an answer carrying `error` is thrown as a DynsecError (except the "already
// exists"/"not found" answers the caller says it expects).
import mqtt, { type MqttClient } from "mqtt";

const CONTROL_TOPIC = "$CONTROL/dynamic-security/v1";
const RESPONSE_TOPIC = `${CONTROL_TOPIC}/response`;

export type DynsecCommand = { command: string } & Record<string, unknown>;
export type DynsecAnswer = { command: string; error?: string; data?: Record<string, unknown> };

export class DynsecError extends Error {
  constructor(
    readonly command: string,
    readonly reason: string,
  ) {
    super(`dynamic security ${command}: ${reason}`);
    this.name = "DynsecError";
  }
}

export type DynsecConnection = { host: string; port: number; username: string; password: string; clientId: string };

export class DynsecClient {
  private waiting: Array<{ resolve(answers: DynsecAnswer[]): void; reject(err: Error): void }> = [];

  private constructor(private readonly client: MqttClient) {
    client.on("message", (topic, payload) => {
      if (topic !== RESPONSE_TOPIC) return;
      const next = this.waiting.shift();
      if (!next) return;
      try {
        const parsed: unknown = JSON.parse(payload.toString("utf8"));
        const responses = typeof parsed === "object" && parsed !== null && "responses" in parsed ? parsed.responses : null;
        next.resolve(Array.isArray(responses) ? (responses as DynsecAnswer[]) : []);
      } catch (err) {
        next.reject(err instanceof Error ? err : new Error(String(err)));
      }
    });
    client.on("close", () => {
      for (const w of this.waiting.splice(0)) w.reject(new Error("the broker connection closed"));
    });
  }

  static async connect(c: DynsecConnection, timeoutMs = 10_000): Promise<DynsecClient> {
    const client = mqtt.connect({
      host: c.host,
      port: c.port,
      protocolVersion: 5,
      clientId: c.clientId,
      username: c.username,
      password: c.password,
      clean: true,
      reconnectPeriod: 1000,
      connectTimeout: timeoutMs,
    });
    await new Promise<void>((resolve, reject) => {
      const timer = setTimeout(() => {
        client.end(true);
        reject(new Error(`could not reach the broker's control topic at ${c.host}:${c.port}`));
      }, timeoutMs);
      client.once("connect", () => {
        clearTimeout(timer);
        resolve();
      });
    });
    const me = new DynsecClient(client);
    await client.subscribeAsync(RESPONSE_TOPIC, { qos: 1 });
    return me;
  }

  /**
   * Sends commands and returns one answer per command, in order. Groups stay under 8 KB: the
   * broker's packet-size limit (MQTT_MAX_PAYLOAD_BYTES) applies to the admin too.
   */
  async run(commands: DynsecCommand[], expected: RegExp = /^$/): Promise<DynsecAnswer[]> {
    const out: DynsecAnswer[] = [];
    const groups: DynsecCommand[][] = [];
    let size = 0;
    for (const c of commands) {
      const bytes = JSON.stringify(c).length;
      if (groups.length === 0 || size + bytes > 8000 || groups[groups.length - 1].length >= 50) {
        groups.push([]);
        size = 0;
      }
      groups[groups.length - 1].push(c);
      size += bytes;
    }
    for (const group of groups) {
      // the plugin answers each publish with one response message, in order
      const answered = new Promise<DynsecAnswer[]>((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error("the dynamic-security plugin did not answer in 10 s")), 10_000);
        this.waiting.push({
          resolve: (a) => {
            clearTimeout(timer);
            resolve(a);
          },
          reject: (e) => {
            clearTimeout(timer);
            reject(e);
          },
        });
      });
      answered.catch(() => undefined); // awaited below; keep an early close from going unhandled
      await this.client.publishAsync(CONTROL_TOPIC, JSON.stringify({ commands: group }), { qos: 1 });
      const answers = await answered;
      for (const [j, cmd] of group.entries()) {
        const a = answers[j] ?? { command: cmd.command, error: "no answer" };
        if (a.error && !expected.test(a.error)) throw new DynsecError(cmd.command, a.error);
        out.push(a);
      }
    }
    return out;
  }

  async one(command: DynsecCommand, expected?: RegExp): Promise<DynsecAnswer> {
    const [a] = await this.run([command], expected);
    return a;
  }

  async close(): Promise<void> {
    await this.client.endAsync().catch(() => undefined);
  }
}
