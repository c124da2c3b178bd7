/**
 * The route table of the search stand-in: method + path pattern → handler (search/handlers/). `:name` matches one
 * path segment. A path that no pattern matches answers 404, a known path with the wrong method 405, both with an
 * empty body, as the service answers (the client then throws "404: Not Found" without a `cause`).
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import type { SearchIndex } from "./engine.ts";
import { SETTINGS } from "./engine.ts";
import {
  addDocuments,
  deleteAllDocuments,
  deleteDocument,
  deleteDocumentBatch,
  deleteDocumentsByFilter,
  fetchDocuments,
  getDocument,
  listDocuments,
} from "./handlers/documents.ts";
import { health, stats, version } from "./handlers/health.ts";
import { createIndex, deleteIndex, getIndex, indexStats, listIndexes, updateIndex } from "./handlers/indexes.ts";
import { authorize } from "./handlers/keys.ts";
import { search } from "./handlers/search.ts";
import { getSetting, getSettings, updateSetting, updateSettings } from "./handlers/settings.ts";
import { getTask, getTasks } from "./handlers/tasks.ts";
import { indexUidParam, send } from "./http.ts";
import type { TaskQueue } from "./tasks.ts";

/** What the handlers share: the indexes, the task queue and the key. */
export interface StandInState {
  indexes: Map<string, SearchIndex>;
  tasks: TaskQueue;
  apiKey: string | undefined;
}

/** One request as a handler sees it; `uid` is the checked index uid of an /indexes/:uid/… path ("" elsewhere). */
export interface Call {
  req: IncomingMessage;
  res: ServerResponse;
  method: string;
  params: URLSearchParams;
  segs: string[];
  uid: string;
  state: StandInState;
}

export type Handler = (c: Call) => unknown;

interface Route {
  method: string;
  path: string;
  handler: Handler;
  /** Answered without the key check (GET /health, STACK.md §4). */
  public?: boolean;
}

const settingRoutes = Object.values(SETTINGS).flatMap(({ route }): Route[] => [
  { method: "GET", path: `/indexes/:uid/settings/${route}`, handler: getSetting },
  ...["PUT", "PATCH", "DELETE"].map((method) => ({ method, path: `/indexes/:uid/settings/${route}`, handler: updateSetting })),
]);

/** In order: the first route whose path and method match answers (POST …/documents/fetch before GET …/documents/:id). */
const ROUTES: (Route & { segs: string[] })[] = (
  [
    { method: "GET", path: "/health", handler: health, public: true },
    { method: "GET", path: "/version", handler: version },
    { method: "GET", path: "/stats", handler: stats },
    { method: "GET", path: "/tasks", handler: getTasks },
    { method: "GET", path: "/tasks/:taskUid", handler: getTask },
    { method: "GET", path: "/indexes", handler: listIndexes },
    { method: "POST", path: "/indexes", handler: createIndex },
    { method: "GET", path: "/indexes/:uid", handler: getIndex },
    { method: "PATCH", path: "/indexes/:uid", handler: updateIndex },
    { method: "DELETE", path: "/indexes/:uid", handler: deleteIndex },
    { method: "GET", path: "/indexes/:uid/stats", handler: indexStats },
    { method: "GET", path: "/indexes/:uid/search", handler: search },
    { method: "POST", path: "/indexes/:uid/search", handler: search },
    { method: "GET", path: "/indexes/:uid/documents", handler: listDocuments },
    { method: "POST", path: "/indexes/:uid/documents", handler: addDocuments },
    { method: "PUT", path: "/indexes/:uid/documents", handler: addDocuments },
    { method: "DELETE", path: "/indexes/:uid/documents", handler: deleteAllDocuments },
    { method: "POST", path: "/indexes/:uid/documents/fetch", handler: fetchDocuments },
    { method: "POST", path: "/indexes/:uid/documents/delete-batch", handler: deleteDocumentBatch },
    { method: "POST", path: "/indexes/:uid/documents/delete", handler: deleteDocumentsByFilter },
    { method: "GET", path: "/indexes/:uid/documents/:id", handler: getDocument },
    { method: "DELETE", path: "/indexes/:uid/documents/:id", handler: deleteDocument },
    { method: "GET", path: "/indexes/:uid/settings", handler: getSettings },
    { method: "PATCH", path: "/indexes/:uid/settings", handler: updateSettings },
    { method: "DELETE", path: "/indexes/:uid/settings", handler: updateSettings },
    ...settingRoutes,
  ] as Route[]
).map((r) => ({ ...r, segs: r.path.split("/").filter(Boolean) }));

const matches = (route: { segs: string[] }, segs: string[]) =>
  route.segs.length === segs.length && route.segs.every((s, i) => s.startsWith(":") || s === segs[i]);

/** Answer one service request (the fault modes and the control routes are handled before, in server.ts). */
export async function route(state: StandInState, req: IncomingMessage, res: ServerResponse, url: URL): Promise<void> {
  const method = req.method ?? "GET";
  const segs = url.pathname.split("/").filter(Boolean);
  const params = url.searchParams;
  const known = ROUTES.filter((r) => matches(r, segs));
  // GET /health is public: answered (or refused 405) before the key check; every other path, unknown ones too, needs the key
  if (!known.some((r) => r.public)) authorize(state.apiKey, req);
  // an index uid in the path is checked before the rest of the route (a bad one answers 400 even where 404 or 405 would follow)
  const uid = segs[0] === "indexes" && segs.length >= 2 ? indexUidParam(segs[1]) : "";
  if (known.length === 0) {
    send(res, 404);
    return;
  }
  const r = known.find((k) => k.method === method);
  if (!r) {
    // wrong method on a known route: 405 with an empty body, as the service answers
    send(res, 405);
    return;
  }
  await r.handler({ req, res, method, params, segs, uid, state });
}
