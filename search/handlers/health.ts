/**
 * GET /health (public, STACK.md §4), GET /version and GET /stats.
 */
import { send } from "../http.ts";
import type { Handler } from "../routes.ts";

export const health: Handler = ({ res }) => send(res, 200, { status: "available" });

export const version: Handler = ({ res }) => send(res, 200, { commitSha: "stand-in", commitDate: "unknown", pkgVersion: "stand-in" });

export const stats: Handler = ({
  res,
  state: {
    indexes,
    tasks: { queue },
  },
}) => {
  const out: Record<string, unknown> = {};
  for (const [uid, i] of indexes) out[uid] = { numberOfDocuments: i.docs.size, isIndexing: queue.some((t) => t.indexUid === uid) };
  send(res, 200, { databaseSize: 0, lastUpdate: null, indexes: out });
};
