/**
 * What each task does to the in-memory indexes (the task queue in tasks.ts calls it, one task at a time).
 */
import { applySetting, compileFilter, filterablePatterns, SearchIndex } from "./engine.ts";
import { ApiError, DOCUMENT_ID_RULE, indexNotFound } from "./errors.ts";
import { matchesFilter } from "./filter.ts";
import type { TaskRecord } from "./tasks.ts";

/** A document id as the service accepts it (integer, or string of a-z A-Z 0-9 - _ up to 511 bytes). */
function documentKey(id: unknown): string | null {
  if (typeof id === "number") return Number.isSafeInteger(id) && id >= 0 ? String(id) : null;
  if (typeof id === "string") return /^[A-Za-z0-9_-]+$/.test(id) && Buffer.byteLength(id) <= 511 ? id : null;
  return null;
}

/** The index, or 404 index_not_found. */
export function requireIndex(indexes: Map<string, SearchIndex>, uid: string): SearchIndex {
  const i = indexes.get(uid);
  if (!i) throw indexNotFound(uid);
  return i;
}

/** Apply one task to the in-memory state; throws (changing nothing) when the task fails. */
export function applyTask(indexes: Map<string, SearchIndex>, t: TaskRecord) {
  const uid = t.indexUid!;
  const p = t.payload!;
  const now = new Date().toISOString();
  switch (p.kind) {
    case "createIndex": {
      if (indexes.has(uid)) throw new ApiError(409, "index_already_exists", `Index \`${uid}\` already exists.`);
      indexes.set(uid, new SearchIndex(uid, p.primaryKey, now));
      return;
    }
    case "updateIndex": {
      const index = requireIndex(indexes, uid);
      if (p.primaryKey !== null && p.primaryKey !== index.primaryKey) {
        if (index.docs.size > 0) {
          throw new ApiError(400, "index_primary_key_already_exists", `Index \`${uid}\`: Index already has a primary key: \`${index.primaryKey}\`.`);
        }
        index.primaryKey = p.primaryKey;
        index.settingsChanged();
      }
      index.touch(now);
      return;
    }
    case "deleteIndex": {
      const index = requireIndex(indexes, uid);
      t.details.deletedDocuments = index.docs.size;
      indexes.delete(uid);
      return;
    }
    case "documents": {
      const existing = indexes.get(uid);
      let pk = existing?.primaryKey ?? null;
      if (p.primaryKey !== null) {
        if (pk !== null && pk !== p.primaryKey && (existing?.docs.size ?? 0) > 0) {
          throw new ApiError(400, "index_primary_key_already_exists", `Index \`${uid}\`: Index already has a primary key: \`${pk}\`.`);
        }
        pk = p.primaryKey;
      }
      if (pk === null) {
        const candidates = Object.keys(p.docs[0] ?? {}).filter((k) => k.toLowerCase().endsWith("id"));
        if (candidates.length === 0) {
          throw new ApiError(
            400,
            "index_primary_key_no_candidate_found",
            "The primary key inference failed as the engine did not find any field ending with `id` in its name. Please specify the primary key manually using the `primaryKey` query parameter.",
          );
        }
        if (candidates.length > 1) {
          throw new ApiError(
            400,
            "index_primary_key_multiple_candidates_found",
            `The primary key inference failed as the engine found ${candidates.length} fields ending with \`id\` in their names: ${candidates.map((c) => `'${c}'`).join(" and ")}. Please specify the primary key manually using the \`primaryKey\` query parameter.`,
          );
        }
        pk = candidates[0];
      }
      for (const doc of p.docs) {
        if (!Object.hasOwn(doc, pk)) {
          throw new ApiError(400, "missing_document_id", `Document doesn't have a \`${pk}\` attribute: \`${JSON.stringify(doc)}\`.`);
        }
        if (documentKey(doc[pk]) === null) {
          throw new ApiError(400, "invalid_document_id", `Document identifier \`${JSON.stringify(doc[pk])}\` is invalid. ${DOCUMENT_ID_RULE}`);
        }
      }
      let index = existing;
      if (!index) {
        index = new SearchIndex(uid, pk, now);
        indexes.set(uid, index);
      } else if (index.primaryKey !== pk) {
        index.primaryKey = pk;
        index.settingsChanged();
      }
      index.upsert(p.docs, p.merge);
      index.touch(now);
      t.details.indexedDocuments = p.docs.length;
      return;
    }
    case "deleteIds": {
      const index = requireIndex(indexes, uid);
      t.details.deletedDocuments = index.delete(p.ids);
      index.touch(now);
      return;
    }
    case "deleteFilter": {
      const index = requireIndex(indexes, uid);
      const node = compileFilter(p.filter, filterablePatterns(index.settings), index.primaryKey, "invalid_document_filter");
      const keys = [...index.docs].filter(([, d]) => matchesFilter(node, d)).map(([k]) => k);
      t.details.deletedDocuments = index.delete(keys);
      index.touch(now);
      return;
    }
    case "deleteAll": {
      const index = requireIndex(indexes, uid);
      t.details.deletedDocuments = index.clear();
      index.touch(now);
      return;
    }
    case "settings": {
      // updating settings creates the index when it does not exist (as the service does)
      let index = indexes.get(uid);
      const created = !index;
      index ??= new SearchIndex(uid, null, now);
      for (const [name, value] of Object.entries(p.settings)) applySetting(index.settings, name, value);
      index.settingsChanged();
      index.touch(now);
      if (created) indexes.set(uid, index);
      return;
    }
  }
}
