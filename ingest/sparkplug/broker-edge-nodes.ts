// Edge-node sign-in for the broker: an edge node signs in with its code (user name and client
// id) and secret, like a device, and is then confined to its own group and node id
// (lib/sparkplug/topics.ts). The credentials are reloaded with the device credentials; a node
// disabled or re-keyed since it signed in is disconnected. A publish under another node's id is
// refused by the broker and recorded against the node that tried, for its gateway page.
import type { Db } from "../../db/client";
import { listEdgeNodeCredentials, type EdgeNodeCredential } from "../../db/queries/gateways-auth";
import { insertGatewayRejections } from "../../db/queries/gateways-write";
import { verifyDeviceSecret } from "../../lib/device-secrets";
import { parseSparkplugTopic } from "../../lib/sparkplug/topics";
import type { Logger } from "../log";
import { describeError } from "../log";

export type EdgeNodePrincipal = { kind: "edge_node"; code: string; groupId: string; nodeId: string; secretHash?: string };

export class EdgeNodeSignIn {
  private byCode = new Map<string, EdgeNodeCredential>();
  private busy = false;

  constructor(
    private readonly db: Db,
    private readonly log: Logger,
  ) {}

  has(code: string): boolean {
    return this.byCode.has(code);
  }

  /** Reloads; returns the codes of signed-in nodes that may no longer sign in. */
  async reload(signedIn: Iterable<{ code: string; secretHash?: string }>): Promise<string[]> {
    if (this.busy) return [];
    this.busy = true;
    try {
      const rows = await listEdgeNodeCredentials(this.db);
      this.byCode = new Map(rows.map((r) => [r.code, r]));
    } catch (err) {
      this.log.warn("could not reload edge-node credentials; keeping the cached ones", { error: describeError(err) });
      return [];
    } finally {
      this.busy = false;
    }
    const out: string[] = [];
    for (const p of signedIn) {
      const c = this.byCode.get(p.code);
      if (!c || !c.enabled || c.secretHash !== p.secretHash) out.push(p.code);
    }
    return out;
  }

  /** The principal for a correct secret of an enabled node; otherwise a reason to refuse. */
  check(code: string, secret: string): { ok: true; principal: EdgeNodePrincipal } | { ok: false; disabled: boolean } {
    const c = this.byCode.get(code);
    if (!c || !verifyDeviceSecret(secret, c.secretHash)) return { ok: false, disabled: false };
    if (!c.enabled) return { ok: false, disabled: true };
    return { ok: true, principal: { kind: "edge_node", code, groupId: c.groupId, nodeId: c.nodeId, secretHash: c.secretHash } };
  }

  /** A refused publish of an edge node: under another node's id it is kept as a gateway refusal. */
  refused(p: EdgeNodePrincipal, topic: string): void {
    const t = parseSparkplugTopic(topic);
    if (!t || t.kind !== "message" || (t.groupId === p.groupId && t.nodeId === p.nodeId)) return;
    const id = this.byCode.get(p.code)?.id ?? null;
    insertGatewayRejections(this.db, [
      { ts: Date.now(), edgeNodeId: id, topic, reason: "foreign_node_id", detail: `signed in as ${p.groupId}/${p.nodeId}, published as ${t.groupId}/${t.nodeId}` },
    ]).catch((err: unknown) => this.log.warn("could not record a refused edge-node publish", { error: describeError(err) }));
  }
}
