/**
 * Documents: GET|POST|PUT|DELETE /indexes/:uid/documents, POST …/documents/fetch, POST …/documents/delete-batch,
 * POST …/documents/delete ({filter}) and GET|DELETE …/documents/:id.
 */
import { requireIndex } from "../apply.ts";
import { compareForSort, compileFilter, filterablePatterns, type SearchIndex } from "../engine.ts";
import { ApiError } from "../errors.ts";
import { attributeAllowed, FilterSyntaxError, matchesFilter, parseFilter } from "../filter.ts";
import { asObject, badType, documentsBody, intParam, jsonBody, nonNegativeInt, rejectUnknown, send, typeName } from "../http.ts";
import type { Handler } from "../routes.ts";
import { enqueued } from "../tasks.ts";

export const listDocuments: Handler = ({ res, params, uid, state: { indexes } }) => {
  const index = requireIndex(indexes, uid);
  const fields = params.get("fields");
  const ids = params.get("ids");
  const sort = params.get("sort");
  send(
    res,
    200,
    documentsList(index, {
      offset: intParam(params, "offset", 0, "invalid_document_offset"),
      limit: intParam(params, "limit", 20, "invalid_document_limit"),
      fields: fields === null ? null : fields.split(",").map((s) => s.trim()),
      filter: params.get("filter") ?? undefined,
      ids: ids === null ? null : ids.split(","),
      sort: sort === null ? null : sort.split(","),
    }),
  );
};

export const deleteAllDocuments: Handler = ({
  res,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  send(res, 202, enqueued(enqueue("documentDeletion", uid, { providedIds: 0, deletedDocuments: null, originalFilter: null }, { kind: "deleteAll" })));
};

/** POST adds (replaces), PUT updates (merges). */
export const addDocuments: Handler = async ({
  req,
  res,
  method,
  params,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  const docs = await documentsBody(req);
  const pkParam = params.get("primaryKey");
  send(
    res,
    202,
    enqueued(
      enqueue(
        "documentAdditionOrUpdate",
        uid,
        { receivedDocuments: docs.length, indexedDocuments: null },
        { kind: "documents", docs, primaryKey: pkParam, merge: method === "PUT" },
      ),
    ),
  );
};

export const fetchDocuments: Handler = async ({ req, res, uid, state: { indexes } }) => {
  const body = asObject(await jsonBody(req));
  rejectUnknown(body, ["offset", "limit", "fields", "filter", "ids", "sort", "retrieveVectors"]);
  const offset = body.offset === undefined ? 0 : nonNegativeInt("invalid_document_offset", "offset", body.offset);
  const limit = body.limit === undefined ? 20 : nonNegativeInt("invalid_document_limit", "limit", body.limit);
  if (body.fields !== undefined && body.fields !== null && (!Array.isArray(body.fields) || body.fields.some((f) => typeof f !== "string"))) {
    badType("invalid_document_fields", "fields", "an array", body.fields);
  }
  if (body.ids !== undefined && body.ids !== null && !Array.isArray(body.ids)) badType("invalid_document_ids", "ids", "an array", body.ids);
  if (body.sort !== undefined && body.sort !== null && (!Array.isArray(body.sort) || body.sort.some((f) => typeof f !== "string"))) {
    badType("invalid_document_sort", "sort", "an array", body.sort);
  }
  send(
    res,
    200,
    documentsList(requireIndex(indexes, uid), {
      offset,
      limit,
      fields: (body.fields as string[] | null | undefined) ?? null,
      filter: body.filter,
      ids: (body.ids as unknown[] | null | undefined) ?? null,
      sort: (body.sort as string[] | null | undefined) ?? null,
    }),
  );
};

export const deleteDocumentBatch: Handler = async ({
  req,
  res,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  const body = await jsonBody(req);
  if (!Array.isArray(body) || body.some((id) => typeof id !== "string" && typeof id !== "number")) {
    throw new ApiError(400, "bad_request", `Json deserialize error: invalid type: ${typeName(body)}, expected a sequence of document ids`);
  }
  const ids = body.map((id) => String(id));
  send(
    res,
    202,
    enqueued(enqueue("documentDeletion", uid, { providedIds: ids.length, deletedDocuments: null, originalFilter: null }, { kind: "deleteIds", ids })),
  );
};

export const deleteDocumentsByFilter: Handler = async ({
  req,
  res,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  const body = asObject(await jsonBody(req));
  rejectUnknown(body, ["filter"]);
  if (body.filter === undefined || body.filter === null) throw new ApiError(400, "missing_document_filter", "Missing field `filter`");
  try {
    parseFilter(body.filter);
  } catch (e) {
    if (e instanceof FilterSyntaxError) throw new ApiError(400, "invalid_document_filter", e.message);
    throw e;
  }
  send(
    res,
    202,
    enqueued(
      enqueue(
        "documentDeletion",
        uid,
        { providedIds: 0, deletedDocuments: null, originalFilter: JSON.stringify(body.filter) },
        { kind: "deleteFilter", filter: body.filter },
      ),
    ),
  );
};

export const getDocument: Handler = ({ res, params, segs, uid, state: { indexes } }) => {
  const id = decodeURIComponent(segs[3]);
  const index = requireIndex(indexes, uid);
  const doc = index.docs.get(id);
  if (!doc) throw new ApiError(404, "document_not_found", `Document \`${id}\` not found.`);
  const fields = params.get("fields");
  send(res, 200, index.project(doc, fields === null ? null : fields.split(",").map((s) => s.trim())));
};

export const deleteDocument: Handler = ({
  res,
  segs,
  uid,
  state: {
    tasks: { enqueue },
  },
}) => {
  const id = decodeURIComponent(segs[3]);
  send(
    res,
    202,
    enqueued(enqueue("documentDeletion", uid, { providedIds: 1, deletedDocuments: null, originalFilter: null }, { kind: "deleteIds", ids: [id] })),
  );
};

function documentsList(
  index: SearchIndex,
  q: { offset: number; limit: number; fields: string[] | null; filter: unknown; ids: unknown[] | null; sort: string[] | null },
) {
  let filter = null;
  if (q.filter !== undefined && q.filter !== null) {
    filter = compileFilter(q.filter, filterablePatterns(index.settings), index.primaryKey, "invalid_document_filter");
  }
  let docs = [...index.docs.entries()];
  if (q.ids) {
    const wanted = new Set(q.ids.map((id) => String(id)));
    docs = docs.filter(([k]) => wanted.has(k));
  }
  if (filter) docs = docs.filter(([, d]) => matchesFilter(filter, d));
  if (q.sort?.length) {
    const specs = q.sort.map((s) => {
      const m = /^(.+):(asc|desc)$/.exec(s.trim());
      if (!m)
        throw new ApiError(
          400,
          "invalid_document_sort",
          `Invalid syntax for the sort parameter: expected expression ending by \`:asc\` or \`:desc\`, found \`${s}\`.`,
        );
      if (!attributeAllowed(m[1], index.settings.sortableAttributes)) {
        throw new ApiError(
          400,
          "invalid_document_sort",
          `Attribute \`${m[1]}\` is not sortable. Available sortable attributes are: \`${index.settings.sortableAttributes.join(", ")}\`.`,
        );
      }
      return { attribute: m[1], desc: m[2] === "desc" };
    });
    docs = docs
      .map((d, i) => ({ d, i }))
      .sort((a, b) => {
        for (const s of specs) {
          const c = compareForSort(a.d[1], b.d[1], s.attribute, s.desc);
          if (c) return c;
        }
        return a.i - b.i;
      })
      .map((x) => x.d);
  }
  return {
    results: docs.slice(q.offset, q.offset + q.limit).map(([, d]) => index.project(d, q.fields)),
    offset: q.offset,
    limit: q.limit,
    total: docs.length,
  };
}
