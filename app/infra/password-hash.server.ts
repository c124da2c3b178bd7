/** Password hashing on its own (no database imports), shared by the auth service and the demo seeder. */
import { createHash } from "node:crypto";
import { Worker } from "node:worker_threads";
import bcrypt from "bcryptjs";
import { env } from "../env.server.ts";

/** bcrypt work factor: OWASP ASVS V2.4.4 floor 10; 12 measured at ≈ 245 ms here (QUALITY P7: highest with p50 ≤ 250 ms). */
export const BCRYPT_COST = env.BCRYPT_COST;

// SHA-256 first, so passwords past bcrypt's 72-byte limit are neither truncated nor rejected (ASVS V2.4.4);
// base64 keeps NUL bytes out of bcrypt's input.
const prehash = (password: string) => createHash("sha256").update(password.normalize("NFC"), "utf8").digest("base64");

// bcryptjs is JavaScript: a cost-12 hash is ≈ 250 ms of CPU, and on the main thread it held up every other request
// (fifty parallel sign-ins queued every page behind 12 s of hashing). The work runs on worker threads instead: one per
// core but one, at least one. Each worker is referenced only while it has work, so a script can still exit.
// BCRYPT_WORKERS=0 keeps it in the thread (and any failure to start a worker falls back to that).
const WORKER_CODE = `
const { parentPort } = require("node:worker_threads");
const bcrypt = require("bcryptjs");
parentPort.on("message", async ({ id, op, a, b }) => {
  try {
    const value = op === "hash" ? await bcrypt.hash(a, b) : await bcrypt.compare(a, b);
    parentPort.postMessage({ id, value });
  } catch (e) {
    parentPort.postMessage({ id, error: String(e && e.message || e) });
  }
});`;

type Job = { resolve: (v: unknown) => void; reject: (e: Error) => void };
interface Slot {
  worker: Worker;
  pending: Map<number, Job>;
}
let slots: Slot[] | null = null;
let nextId = 1;
let turn = 0;

function pool(): Slot[] {
  if (slots) return slots;
  const size = env.BCRYPT_WORKERS;
  slots = [];
  for (let i = 0; i < size; i++) {
    try {
      const worker = new Worker(WORKER_CODE, { eval: true });
      worker.unref();
      const slot: Slot = { worker, pending: new Map() };
      worker.on("message", (m: { id: number; value?: unknown; error?: string }) => {
        const job = slot.pending.get(m.id);
        if (!job) return;
        slot.pending.delete(m.id);
        if (slot.pending.size === 0) worker.unref();
        if (m.error !== undefined) job.reject(new Error(m.error));
        else job.resolve(m.value);
      });
      worker.on("error", (e) => {
        for (const job of slot.pending.values()) job.reject(e);
        slot.pending.clear();
        slots = slots?.filter((s) => s !== slot) ?? null;
      });
      slots.push(slot);
    } catch {
      break; // no worker threads here: hash in the thread
    }
  }
  return slots;
}

/**
 * Hashing is refused, not queued, when this many are already waiting or running: each takes ≈ 250 ms of a core, so a
 * queue of fifty sign-ins made the last wait 12 s. Two per worker (one hashing, one next) keeps a sign-in's wait under a
 * second even with the core shared (bench:writes, 50 writers: admitted sign-ins p99 ≈ 1.5 s at three per worker); the caller
 * answers 429 with Retry-After (the form kept) and the site stays quick for everyone else. BCRYPT_QUEUE_MAX overrides.
 */
export class HashingBusy extends Error {
  constructor(readonly retryAfterS: number) {
    super("Too many password checks at once.");
  }
}
let inFlight = 0;
const queueMax = (workers: number) => env.BCRYPT_QUEUE_MAX ?? 2 * Math.max(1, workers);

function run<T>(op: "hash" | "compare", a: string, b: string | number, inThread: () => Promise<T>, wait = false): Promise<T> {
  const live = pool();
  if (!wait && inFlight >= queueMax(live.length)) return Promise.reject(new HashingBusy(2));
  inFlight++;
  return admitted(live, op, a, b, inThread).finally(() => {
    inFlight--;
  });
}

function admitted<T>(live: Slot[], op: "hash" | "compare", a: string, b: string | number, inThread: () => Promise<T>): Promise<T> {
  if (!live.length) return inThread();
  const slot = live[turn++ % live.length];
  const id = nextId++;
  return new Promise<T>((resolve, reject) => {
    slot.pending.set(id, { resolve: resolve as (v: unknown) => void, reject });
    slot.worker.ref();
    slot.worker.postMessage({ id, op, a, b });
  });
}

/**
 * Hash a password for storage. A request's hash is refused with HashingBusy when the queue is at its bound; `wait`
 * (the seeder, the admin CLI, the bench: no one is waiting on a page) queues it however long the queue is.
 */
export function hashPassword(password: string, cost = BCRYPT_COST, opts: { wait?: boolean } = {}): Promise<string> {
  const input = prehash(password);
  return run("hash", input, cost, () => bcrypt.hash(input, cost), opts.wait);
}

/** Check a password against a stored hash. */
export function verifyPassword(password: string, hash: string): Promise<boolean> {
  const input = prehash(password);
  return run("compare", input, hash, () => bcrypt.compare(input, hash));
}
