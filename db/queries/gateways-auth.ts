// What the broker and the Sparkplug host need to know about edge nodes: who may sign in
// (hashed secret, enabled) and under which group and node id. The secret hash goes to the
// broker's sign-in check and nowhere else.
import { eq } from "drizzle-orm";
import type { Db } from "../client";
import { edgeNodes } from "../schema";

export type EdgeNodeCredential = { id: number; code: string; groupId: string; nodeId: string; enabled: boolean; secretHash: string };
export type HostEdgeNode = { id: number; code: string; groupId: string; nodeId: string; enabled: boolean };

const credentialColumns = {
  id: edgeNodes.id,
  code: edgeNodes.code,
  groupId: edgeNodes.groupId,
  nodeId: edgeNodes.nodeId,
  enabled: edgeNodes.enabled,
  secretHash: edgeNodes.secretHash,
};

export async function listEdgeNodeCredentials(db: Db): Promise<EdgeNodeCredential[]> {
  return db.select(credentialColumns).from(edgeNodes);
}

export async function findEdgeNodeCredential(db: Db, code: string): Promise<EdgeNodeCredential | null> {
  const rows = await db.select(credentialColumns).from(edgeNodes).where(eq(edgeNodes.code, code)).limit(1);
  return rows[0] ?? null;
}

export async function listHostEdgeNodes(db: Db): Promise<HostEdgeNode[]> {
  return db
    .select({ id: edgeNodes.id, code: edgeNodes.code, groupId: edgeNodes.groupId, nodeId: edgeNodes.nodeId, enabled: edgeNodes.enabled })
    .from(edgeNodes);
}
