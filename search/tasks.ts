/**
 * The task queue of the search stand-in. Writes answer 202 with an EnqueuedTask and are processed asynchronously, in
 * order, by one queue; consecutive tasks of one index are processed as one batch (as the service auto-batches) and
 * persisted once, before any of them is reported succeeded. Task history is kept in memory.
 */
import { applyTask } from "./apply.ts";
import type { Doc, SearchIndex } from "./engine.ts";
import { ApiError, errorBody, type ErrorBody } from "./errors.ts";
import type { Store } from "./store.ts";

/** Tasks of one index processed (and persisted) together at most. */
const MAX_BATCH = 200;

export type TaskStatus = "enqueued" | "processing" | "succeeded" | "failed" | "canceled";
export type TaskType = "indexCreation" | "indexUpdate" | "indexDeletion" | "documentAdditionOrUpdate" | "documentDeletion" | "settingsUpdate";
export const TASK_STATUSES: TaskStatus[] = ["enqueued", "processing", "succeeded", "failed", "canceled"];
export const TASK_TYPES = [
  "documentAdditionOrUpdate",
  "documentEdition",
  "documentDeletion",
  "settingsUpdate",
  "indexCreation",
  "indexDeletion",
  "indexUpdate",
  "indexSwap",
  "taskCancelation",
  "taskDeletion",
  "dumpCreation",
  "snapshotCreation",
  "upgradeDatabase",
];

export type Payload =
  | { kind: "createIndex"; primaryKey: string | null }
  | { kind: "updateIndex"; primaryKey: string | null }
  | { kind: "deleteIndex" }
  | { kind: "documents"; docs: Doc[]; primaryKey: string | null; merge: boolean }
  | { kind: "deleteIds"; ids: string[] }
  | { kind: "deleteFilter"; filter: unknown }
  | { kind: "deleteAll" }
  | { kind: "settings"; settings: Record<string, unknown> };

/** The service's Task object (STACK.md §4), plus what the processor needs. */
export interface TaskRecord {
  uid: number;
  batchUid: number | null;
  indexUid: string | null;
  status: TaskStatus;
  type: TaskType;
  canceledBy: null;
  details: Record<string, unknown>;
  error: ErrorBody | null;
  duration: string | null;
  enqueuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  payload?: Payload;
}

export function taskView(t: TaskRecord) {
  const { payload: _payload, ...view } = t;
  return view;
}

/** ISO 8601 duration, as the service writes task durations ("PT0.001S"). */
export const isoDuration = (ms: number) => `PT${(ms / 1000).toFixed(6).replace(/0+$/, "").replace(/\.$/, ".0")}S`;

/** The EnqueuedTask the service answers a write with (HTTP 202, STACK.md §4). */
export const enqueued = (t: TaskRecord) => ({ taskUid: t.uid, indexUid: t.indexUid, status: t.status, type: t.type, enqueuedAt: t.enqueuedAt });

export type TaskQueue = ReturnType<typeof createTaskQueue>;

/** The queue over the given indexes; the first task gets number `firstUid` (a restarted stand-in continues after the last persisted one). */
export function createTaskQueue(indexes: Map<string, SearchIndex>, store: Store, firstUid: number) {
  const tasks: TaskRecord[] = [];
  const taskByUid = new Map<number, TaskRecord>();
  let nextTaskUid = firstUid;
  const queue: TaskRecord[] = [];
  let processing: Promise<void> | null = null;
  let closed = false;

  function enqueue(type: TaskType, indexUid: string | null, details: Record<string, unknown>, payload: Payload): TaskRecord {
    const task: TaskRecord = {
      uid: nextTaskUid++,
      batchUid: null,
      indexUid,
      status: "enqueued",
      type,
      canceledBy: null,
      details,
      error: null,
      duration: null,
      enqueuedAt: new Date().toISOString(),
      startedAt: null,
      finishedAt: null,
      payload,
    };
    tasks.push(task);
    taskByUid.set(task.uid, task);
    queue.push(task);
    kick();
    return task;
  }

  function kick() {
    if (processing || closed) return;
    processing = new Promise<void>((resolve) => setImmediate(resolve)).then(runQueue).finally(() => {
      processing = null;
      if (queue.length && !closed) kick();
    });
  }

  async function runQueue() {
    while (queue.length && !closed) {
      const first = queue[0];
      let n = 1;
      while (n < queue.length && n < MAX_BATCH && queue[n].indexUid === first.indexUid) n += 1;
      const batch = queue.splice(0, n);
      const startedAt = new Date().toISOString();
      const t0 = performance.now();
      for (const t of batch) {
        t.status = "processing";
        t.batchUid = first.uid;
        t.startedAt = startedAt;
      }
      const outcomes: (ErrorBody | null)[] = [];
      const uid = first.indexUid!;
      let touched = false;
      for (const t of batch) {
        try {
          applyTask(indexes, t);
          outcomes.push(null);
          touched = true;
        } catch (e) {
          outcomes.push(e instanceof ApiError ? e.body : errorBody("internal", (e as Error).message, "internal"));
        }
      }
      const index = indexes.get(uid);
      let persistError: ErrorBody | null = null;
      if (touched) {
        try {
          index?.refresh();
          if (index) await store.save(index, batch[batch.length - 1].uid);
          else await store.remove(uid);
          await store.saveMeta(batch[batch.length - 1].uid);
        } catch (e) {
          persistError = errorBody("io_error", `The stand-in could not write its data: ${(e as Error).message}`, "system");
          // what is on disk is the truth: go back to it
          const back = store.loadOne(uid);
          if (back) indexes.set(uid, back);
          else indexes.delete(uid);
        }
      }
      const finishedAt = new Date().toISOString();
      const duration = isoDuration(performance.now() - t0);
      batch.forEach((t, i) => {
        const error = persistError && outcomes[i] === null ? persistError : outcomes[i];
        t.status = error ? "failed" : "succeeded";
        t.error = error;
        t.finishedAt = finishedAt;
        t.duration = duration;
        if (error) zeroDetails(t);
        delete t.payload;
      });
      // let HTTP requests in between batches
      await new Promise<void>((resolve) => setImmediate(resolve));
    }
  }

  function zeroDetails(t: TaskRecord) {
    if ("indexedDocuments" in t.details) t.details.indexedDocuments = 0;
    if ("deletedDocuments" in t.details) t.details.deletedDocuments = 0;
  }

  return {
    tasks,
    taskByUid,
    queue,
    enqueue,
    /** No batch starts after this (close()). */
    stop: () => {
      closed = true;
    },
    /** Resolves when the batch being written (if any) is persisted. */
    drain: async () => {
      await processing?.catch(() => {});
    },
  };
}
