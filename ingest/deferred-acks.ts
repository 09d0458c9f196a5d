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
    // one socket write for a whole batch of PUBACKs instead of one (or more) per message
    const stream = tokens.length > 1 && this.client.connected ? this.client.stream : null;
    if (stream) stream.cork();
    for (const t of tokens) {
      if (!t) continue;
      if (t.epoch !== this.epoch || !this.client.connected) {
        this.discarded++;
        continue;
      }
      this.send({ cmd: "puback", messageId: t.messageId }, undefined, undefined, true);
      this.sent++;
    }
    if (stream) process.nextTick(() => stream.uncork());
  }
}
