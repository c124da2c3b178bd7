/**
 * The local stand-in for the hosted search service: an HTTP server on 127.0.0.1 that speaks the subset of the
 * service's API that its official JavaScript client (meilisearch 0.62.0) uses — the endpoints and JSON shapes listed in
 * ../shared/STACK.md §4, which is this file's contract. `npm start` runs it beside the app; tests start it in-process
 * with startSearchStandIn({ port: 0, dataDir }); `npm run search:standin` runs it alone. See search/README.md.
 *
 *   health · indexes (create/get/list/update/delete) · documents (add = replace, update = merge, delete one / batch /
 *   by filter / all, list, fetch with filter, get one) · settings (whole object and per-setting routes) · search
 *   (POST and GET) · tasks (GET /tasks/:uid, GET /tasks) · Bearer key checks · errors in the service's shape.
 *
 * Writes answer 202 with an EnqueuedTask and are processed asynchronously, in order, by one queue; consecutive tasks
 * of one index are processed as one batch (as the service auto-batches) and persisted once, before any of them is
 * reported succeeded: <dataDir>/indexes/<uid>.json (settings + documents; temp file, fsync, rename). On start the
 * indexes are loaded and their MiniSearch indexes rebuilt, so a restart loses nothing a succeeded task reported. Task
 * history is kept in memory; a restarted stand-in numbers new tasks after the last persisted one.
 *
 * Not part of the service's API (tests only; no key needed): POST /_standin/fault {"mode": "normal" | "hang" | "error"
 * | "slow", "delayMs"?} and GET /_standin/state.
 *
 * This file: the options, the fault modes and control routes, the node:http server and the CLI. The rest: routes.ts
 * (the route table) and handlers/ (one module per area), tasks.ts + apply.ts (the queue and what a task does),
 * store.ts (persistence), http.ts (bodies, answers, parameter checks), settings.ts (the environment), engine.ts (an index).
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { SearchIndex } from "./engine.ts";
import { ApiError, errorBody } from "./errors.ts";
import { asObject, jsonBody, nonNegativeInt, send } from "./http.ts";
import { route, type StandInState } from "./routes.ts";
import { searchSettings } from "./settings.ts";
import { Store } from "./store.ts";
import { createTaskQueue, TASK_STATUSES } from "./tasks.ts";

const HOST = "127.0.0.1";
const MODES = ["normal", "hang", "error", "slow"] as const;
export type SearchFaultMode = (typeof MODES)[number];

export interface SearchStandInOptions {
  /** 0 picks a free port. Default SEARCH_PORT or 7700. */
  port?: number;
  host?: "127.0.0.1";
  /** When set, every request except GET /health needs `Authorization: Bearer <key>`. Default SEARCH_KEY (unset: open). */
  apiKey?: string;
  /** Where the indexes are kept. Default SEARCH_DATA_DIR or search/data next to this file. */
  dataDir?: string;
}

export interface SearchStandIn {
  port: number;
  url: string;
  close: () => Promise<void>;
}

// ---- the stand-in ----

export async function startSearchStandIn(options: SearchStandInOptions = {}): Promise<SearchStandIn> {
  // the environment (settings.ts) is read only for what the options leave out
  const store = new Store(options.dataDir ?? searchSettings().dataDir);
  const apiKey = options.apiKey ?? searchSettings().apiKey;
  const host = options.host ?? HOST;

  const loaded = store.load();
  const indexes = new Map<string, SearchIndex>(loaded.indexes.map((i) => [i.uid, i]));
  const queue = createTaskQueue(indexes, store, loaded.lastTaskUid + 1);
  const { tasks } = queue;
  const state: StandInState = { indexes, tasks: queue, apiKey };
  let closed = false;

  let mode: SearchFaultMode = "normal";
  let delayMs = 2000;
  const hanging = new Set<ServerResponse>();
  let requests = 0;

  async function handle(req: IncomingMessage, res: ServerResponse) {
    const url = new URL(req.url ?? "/", `http://${HOST}`);
    const segs = url.pathname.split("/").filter(Boolean);

    // ---- control routes of the stand-in (not the service's API; see search/README.md) ----
    if (segs[0] === "_standin") {
      if (segs[1] === "state" && segs.length === 2 && req.method === "GET") {
        const counts: Record<string, number> = Object.fromEntries(TASK_STATUSES.map((s) => [s, 0]));
        for (const t of tasks) counts[t.status] += 1;
        send(res, 200, {
          mode,
          delayMs,
          hanging: hanging.size,
          requests,
          dataDir: store.dir,
          indexes: [...indexes.values()].map((i) => ({ uid: i.uid, documents: i.docs.size })),
          tasks: { total: tasks.length, ...counts },
        });
        return;
      }
      if (segs[1] === "fault" && segs.length === 2 && req.method === "POST") {
        const body = asObject(await jsonBody(req));
        if (!MODES.includes(body.mode as SearchFaultMode)) {
          throw new ApiError(400, "bad_request", `mode must be one of ${MODES.join(", ")}`);
        }
        if (body.delayMs !== undefined) delayMs = nonNegativeInt("bad_request", "delayMs", body.delayMs);
        else if (body.mode === "slow") delayMs = 2000;
        mode = body.mode as SearchFaultMode;
        if (mode !== "hang") releaseHanging();
        send(res, 200, { mode, delayMs });
        return;
      }
      send(res, 404);
      return;
    }

    requests += 1;
    if (mode === "hang") {
      // accept and never answer (until the mode changes or the stand-in closes)
      hanging.add(res);
      res.on("close", () => hanging.delete(res));
      req.resume();
      return;
    }
    if (mode === "error") {
      req.resume();
      send(res, 500, errorBody("internal", "The search stand-in is in fault mode `error`.", "internal"));
      return;
    }
    if (mode === "slow") await new Promise((resolve) => setTimeout(resolve, delayMs));
    await route(state, req, res, url);
  }

  function releaseHanging() {
    for (const res of hanging) res.destroy();
    hanging.clear();
  }

  const server: Server = createServer((req, res) => {
    handle(req, res).catch((e: unknown) => {
      if (res.headersSent) {
        res.destroy();
        return;
      }
      if (e instanceof ApiError) send(res, e.status, e.body);
      else if (e instanceof URIError) send(res, 400, errorBody("bad_request", `Invalid URL: ${e.message}`));
      else {
        console.error(`[search] ${(e as Error).stack ?? e}`);
        send(res, 500, errorBody("internal", (e as Error).message, "internal"));
      }
    });
  });
  server.keepAliveTimeout = 5_000;

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port ?? searchSettings().port, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const port = (server.address() as AddressInfo).port;

  return {
    port,
    url: `http://${host}:${port}`,
    close: async () => {
      if (closed) return;
      closed = true;
      queue.stop();
      releaseHanging();
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      });
      // a batch being written finishes (and is persisted) before close resolves
      await queue.drain();
    },
  };
}

// Run directly: `npm run search:standin` (tsx search/server.ts).
if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  try {
    const s = await startSearchStandIn();
    console.log(`[search] stand-in search service on ${s.url}`);
    for (const sig of ["SIGINT", "SIGTERM"] as const) {
      process.on(sig, () => {
        setTimeout(() => process.exit(0), 3_000).unref();
        s.close().then(() => process.exit(0));
      });
    }
  } catch (e) {
    console.error(`[search] stand-in could not start: ${(e as Error).message}`);
    process.exit(1);
  }
}
