// Stops an oversized MQTT packet while it streams in. aedes' parser (mqtt-packet) buffers a
// packet whole before anyone sees it, so a client announcing a 256 MB PUBLISH would be held in
// memory until it had sent it all. guardConnection() sits between the socket and aedes: it reads
// each packet's fixed header (type byte + "remaining length", MQTT 3.1.1 §2.2) and only counts
// the body bytes as they pass, so the connection is closed as soon as a header announces more
// than the limit — before the body arrives. Nothing is buffered here beyond what aedes reads.
import { Duplex } from "node:stream";
import type { Socket } from "node:net";

/** Follows packet boundaries in a byte stream; feed() answers the announced length over the limit, else null. */
export class FrameMeter {
  private state: "type" | "length" | "body" = "type";
  private length = 0;
  private multiplier = 1;
  private lengthBytes = 0;
  private bodyLeft = 0;

  constructor(private readonly maxRemainingBytes: number) {}

  feed(chunk: Uint8Array): number | null {
    let i = 0;
    while (i < chunk.length) {
      if (this.state === "body") {
        const take = Math.min(this.bodyLeft, chunk.length - i);
        this.bodyLeft -= take;
        i += take;
        if (this.bodyLeft === 0) this.state = "type";
        continue;
      }
      const byte = chunk[i++];
      if (this.state === "type") {
        this.state = "length";
        this.length = 0;
        this.multiplier = 1;
        this.lengthBytes = 0;
        continue;
      }
      this.length += (byte & 0x7f) * this.multiplier;
      this.multiplier *= 128;
      this.lengthBytes++;
      if (this.length > this.maxRemainingBytes) return this.length;
      if (byte & 0x80) {
        // a fifth length byte is malformed (the protocol allows four): refuse it as oversized
        if (this.lengthBytes >= 4) return Number.MAX_SAFE_INTEGER;
        continue;
      }
      this.bodyLeft = this.length;
      this.state = this.length > 0 ? "body" : "type";
    }
    return null;
  }
}

/**
 * Wraps a client socket for broker.handle(): the same bytes both ways, except that a packet
 * announced over `maxRemainingBytes` closes the socket at once (onOversized is told its size).
 */
export function guardConnection(socket: Socket, maxRemainingBytes: number, onOversized: (announcedBytes: number) => void): Duplex {
  const meter = new FrameMeter(maxRemainingBytes);
  const conn = new Duplex({
    read() {
      socket.resume();
    },
    write(chunk: Buffer, _encoding, callback) {
      if (socket.destroyed) return callback(new Error("connection closed"));
      if (socket.write(chunk)) callback();
      else socket.once("drain", () => callback());
    },
    final(callback) {
      socket.end(() => callback());
    },
    destroy(err, callback) {
      socket.destroy();
      callback(err);
    },
  });
  socket.on("data", (chunk: Buffer) => {
    const over = meter.feed(chunk);
    if (over !== null) {
      onOversized(over);
      socket.destroy();
      return;
    }
    if (!conn.push(chunk)) socket.pause();
  });
  socket.on("end", () => conn.push(null));
  socket.on("error", (err) => conn.destroy(err));
  socket.on("close", () => conn.destroy());
  return conn;
}
