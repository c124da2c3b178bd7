/**
 * Indexes: POST /indexes, GET /indexes (offset, limit), GET|PATCH|DELETE /indexes/:uid, GET /indexes/:uid/stats.
 */
import { requireIndex } from "../apply.ts";
import { ApiError, INDEX_UID_RULE, isValidIndexUid } from "../errors.ts";
import { asObject, badType, intParam, jsonBody, rejectUnknown, send } from "../http.ts";
import type { Handler } from "../routes.ts";
import { enqueued } from "../tasks.ts";

export const listIndexes: Handler = ({ res, params, state: { indexes } }) => {
  const offset = intParam(params, "offset", 0, "invalid_index_offset");
  const limit = intParam(params, "limit", 20, "invalid_index_limit");
  const all = [...indexes.values()].sort((a, b) => (a.uid < b.uid ? -1 : 1));
  send(res, 200, { results: all.slice(offset, offset + limit).map((i) => i.info()), offset, limit, total: all.length });
};

export const createIndex: Handler = async ({
  req,
  res,
  state: {
    tasks: { enqueue },
  },
}) => {
  const body = asObject(await jsonBody(req));
  rejectUnknown(body, ["uid", "primaryKey"]);
  if (body.uid === undefined) throw new ApiError(400, "missing_index_uid", "Missing field `uid`");
  if (!isValidIndexUid(body.uid)) throw new ApiError(400, "invalid_index_uid", `\`${String(body.uid)}\` is not a valid index uid. ${INDEX_UID_RULE}`);
  const pk = body.primaryKey ?? null;
  if (pk !== null && typeof pk !== "string") badType("invalid_index_primary_key", "primaryKey", "a string", pk);
  send(res, 202, enqueued(enqueue("indexCreation", body.uid, { primaryKey: pk }, { kind: "createIndex", primaryKey: pk as string | null })));
};

export const getIndex: Handler = ({ res, uid, state: { indexes } }) => {
  send(res, 200, requireIndex(indexes, uid).info());
};

export const updateIndex: Handler = async ({
  req,
  res,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  const body = asObject(await jsonBody(req));
  rejectUnknown(body, ["primaryKey", "uid"]);
  const pk = body.primaryKey ?? null;
  if (pk !== null && typeof pk !== "string") badType("invalid_index_primary_key", "primaryKey", "a string", pk);
  send(res, 202, enqueued(enqueue("indexUpdate", uid, { primaryKey: pk }, { kind: "updateIndex", primaryKey: pk as string | null })));
};

export const deleteIndex: Handler = ({
  res,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  send(res, 202, enqueued(enqueue("indexDeletion", uid, { deletedDocuments: null }, { kind: "deleteIndex" })));
};

export const indexStats: Handler = ({
  res,
  uid,
  state: {
    indexes,
    tasks: { queue },
  },
}) => {
  const index = requireIndex(indexes, uid);
  const fieldDistribution: Record<string, number> = {};
  for (const d of index.docs.values()) for (const k of Object.keys(d)) fieldDistribution[k] = (fieldDistribution[k] ?? 0) + 1;
  send(res, 200, { numberOfDocuments: index.docs.size, isIndexing: queue.some((t) => t.indexUid === uid), fieldDistribution });
};
