// Acknowledge QoS-1 messages only once their readings are committed or spilled.
//
// mqtt.js answers a QoS-1 PUBLISH with PUBACK as soon as `handleMessage` calls back, and it
// handles the next packet only after that, so holding the callback would process one message
// at a time. Instead the worker calls back at once and this module holds the PUBACK: it wraps
// the client's packet sender (mqtt 5.16, pinned in package.json) so that the automatic PUBACK
// is dropped, and sends it itself when the writer reports the message safe.
// A PUBACK belongs to one connection: message ids are reused after a reconnect, so tokens
// carry the connection epoch and tokens of an earlier connection are discarded (the broker
// re-sends those messages on the new connection; the writes are idempotent).
import type { IPublishPacket, MqttClient } from "mqtt";

export type AckToken = { messageId: number; epoch: number };

type SendPacket = (packet: { cmd: string; messageId?: number }, cb?: (err?: Error) => void, cbStorePut?: unknown, noStore?: boolean) => void;

export class DeferredAcks {
  private epoch = 0;
  private readonly send: SendPacket;
  sent = 0;
  discarded = 0;

  constructor(private readonly client: MqttClient) {
    const original: SendPacket = client["_sendPacket"].bind(client);
    this.send = original;
    const wrapped: SendPacket = (packet, cb, cbStorePut, noStore) => {
      if (packet.cmd === "puback") {
        // held back: released by ack() after commit
        if (cb) cb();
        return;
      }
      original(packet, cb, cbStorePut, noStore);
    };
    client["_sendPacket"] = wrapped;
    client.on("connect", () => this.epoch++);
    client.on("close", () => this.epoch++);
  }

  /** A token for a received packet; null for QoS 0 (nothing to acknowledge). */
  token(packet: IPublishPacket): AckToken | null {
    if (packet.qos !== 1 || packet.messageId === undefined) return null;
    return { messageId: packet.messageId, epoch: this.epoch };
  }

  ack(tokens: ReadonlyArray<AckToken | null>): void {
    const stream = this.client.connected ? this.client.stream : null;
    if (tokens.length > 1 && stream && stream.writable) {
      this.ackMany(tokens, stream);
      return;
    }
    for (const t of tokens) {
      if (!t) continue;
      if (t.epoch !== this.epoch || !this.client.connected) {
        this.discarded++;
        continue;
      }
      this.send({ cmd: "puback", messageId: t.messageId }, undefined, undefined, true);
      this.sent++;
    }
  }

  /**
   * A batch of PUBACKs as one buffer and one socket write. Each is the same four bytes in MQTT
   * 3.1.1 (§3.4) and MQTT 5 (§3.4.2.1: a success with no properties may leave out the reason
   * code, remaining length 2): type 4, length 2, the message id. Going through mqtt.js cost
   * several small stream writes per acknowledgement, a sixth of the worker's time at full speed
   * (scripts/bench-ingest.ts (b)). mqtt.js keeps no state for an incoming QoS 1 message, and
   * writes each of its own packets in one synchronous go, so nothing can land between.
   */
  private ackMany(tokens: ReadonlyArray<AckToken | null>, stream: NodeJS.WritableStream): void {
    const bytes = Buffer.allocUnsafe(tokens.length * 4);
    let n = 0;
    for (const t of tokens) {
      if (!t) continue;
      if (t.epoch !== this.epoch) {
        this.discarded++;
        continue;
      }
      bytes[n] = 0x40;
      bytes[n + 1] = 0x02;
      bytes.writeUInt16BE(t.messageId, n + 2);
      n += 4;
    }
    if (n === 0) return;
    stream.write(n === bytes.length ? bytes : bytes.subarray(0, n));
    this.sent += n / 4;
  }
}
