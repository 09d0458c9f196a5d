// Indexed outgoing queues for aedes' in-memory persistence.
//
// aedes keeps, per persistent-session client, the QoS>0 messages sent but not yet acknowledged,
// and its in-memory store finds a message by scanning that list: on every send (to record the
// message id) and every PUBACK. The ingest worker acknowledges only after its batch commits, so
// thousands of messages are in flight and each scan costs more than the whole rest of the
// delivery (more still while the database is down). This replaces the four outgoing-queue
// methods of the store instance with an insertion-ordered Map keyed by (brokerId, brokerCounter)
// plus a message-id index, keeping the same semantics (see aedes-persistence 11, pinned through
// aedes 1.2.0 in package-lock.json). Subscriptions, retained messages, wills and incoming QoS 2
// state stay with the original store.
import { Readable } from "node:stream";

type Stored = {
  cmd?: string;
  brokerId?: string;
  brokerCounter?: number;
  messageId?: number;
  qos?: number;
  [k: string]: unknown;
};
type Queue = { byKey: Map<string, Stored>; keyByMessageId: Map<number, string>; seq: number };
type ClientLike = { id: string };
type SubLike = { clientId: string };

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null;

function toStored(v: unknown): Stored {
  if (!isRecord(v)) throw new TypeError("not a packet");
  return v;
}

/** The same copy aedes-packet makes when a message is queued (without a broker: ids kept). */
function copyForQueue(original: Stored): Stored {
  const p: Stored = {};
  for (const k of ["clientId", "nl", "properties", "messageExpiry"]) if (Object.prototype.hasOwnProperty.call(original, k)) p[k] = original[k];
  p.cmd = original.cmd || "publish";
  p.brokerId = original.brokerId;
  p.brokerCounter = original.brokerCounter || 0;
  p.topic = original.topic;
  p.payload = original.payload || Buffer.alloc(0);
  p.qos = original.qos || 0;
  p.retain = original.retain || false;
  p.dup = original.dup || false;
  if ((p.qos ?? 0) > 0 || p.cmd !== "publish") p.messageId = undefined;
  return p;
}

export function indexOutgoingQueues(persistence: unknown): void {
  if (!isRecord(persistence) || typeof persistence.outgoingUpdate !== "function") {
    throw new Error("unexpected aedes persistence: cannot index its outgoing queues");
  }
  const queues = new Map<string, Queue>();
  const queueOf = (clientId: string): Queue => {
    let q = queues.get(clientId);
    if (!q) queues.set(clientId, (q = { byKey: new Map(), keyByMessageId: new Map(), seq: 0 }));
    return q;
  };
  const keyOf = (q: Queue, p: Stored) => (p.brokerId !== undefined ? `${p.brokerId}:${p.brokerCounter ?? 0}` : `#${q.seq++}`);
  const enqueue = (sub: SubLike, packet: Stored) => {
    const q = queueOf(sub.clientId);
    const p = copyForQueue(packet);
    q.byKey.set(keyOf(q, p), p);
  };

  Object.assign(persistence, {
    async outgoingEnqueue(sub: SubLike, packet: unknown) {
      enqueue(sub, toStored(packet));
    },
    async outgoingEnqueueCombi(subs: SubLike[], packet: unknown) {
      const p = toStored(packet);
      for (const sub of subs) enqueue(sub, p);
    },
    async outgoingUpdate(client: ClientLike, packet: unknown) {
      const p = toStored(packet);
      const q = queueOf(client.id);
      if (p.brokerId !== undefined) {
        const key = `${p.brokerId}:${p.brokerCounter ?? 0}`;
        const stored = q.byKey.get(key);
        if (stored) {
          if (stored.messageId !== undefined && q.keyByMessageId.get(stored.messageId) === key) q.keyByMessageId.delete(stored.messageId);
          stored.messageId = p.messageId;
          if (p.messageId !== undefined) q.keyByMessageId.set(p.messageId, key);
          return;
        }
      }
      // a packet from elsewhere with the id of a stored one (e.g. PUBREL after PUBREC) replaces it in place
      const key = p.messageId !== undefined ? q.keyByMessageId.get(p.messageId) : undefined;
      if (key !== undefined) {
        q.byKey.set(key, p);
        return;
      }
      throw new Error("no such packet");
    },
    async outgoingClearMessageId(client: ClientLike, packet: unknown) {
      const p = toStored(packet);
      const q = queueOf(client.id);
      let key: string | undefined;
      if (p.messageId !== undefined) key = q.keyByMessageId.get(p.messageId);
      else if (p.brokerId !== undefined) key = `${p.brokerId}:${p.brokerCounter ?? 0}`; // never sent: drop it by identity
      if (key === undefined) return undefined;
      const stored = q.byKey.get(key);
      if (!stored) return undefined;
      q.byKey.delete(key);
      if (stored.messageId !== undefined && q.keyByMessageId.get(stored.messageId) === key) q.keyByMessageId.delete(stored.messageId);
      if (q.byKey.size === 0) queues.delete(client.id);
      return stored;
    },
    outgoingStream(client: ClientLike) {
      const q = queues.get(client.id);
      return Readable.from(q ? [...q.byKey.values()] : []);
    },
  });
}
