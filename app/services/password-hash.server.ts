/** Password hashing on its own (no database imports), shared by the auth service and the demo seeder. */
import { createHash } from "node:crypto";
import { availableParallelism } from "node:os";
import { Worker } from "node:worker_threads";
import bcrypt from "bcryptjs";

/** bcrypt work factor: OWASP ASVS V2.4.4 floor 10; 12 measured at ≈ 245 ms here (QUALITY P7: highest with p50 ≤ 250 ms). */
export const BCRYPT_COST = Math.max(10, Number(process.env.BCRYPT_COST ?? 12));

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
interface Slot { worker: Worker; pending: Map<number, Job> }
let slots: Slot[] | null = null;
let nextId = 1;
let turn = 0;

function pool(): Slot[] {
  if (slots) return slots;
  const size = Number(process.env.BCRYPT_WORKERS ?? Math.max(1, availableParallelism() - 1));
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

function run<T>(op: "hash" | "compare", a: string, b: string | number, inThread: () => Promise<T>): Promise<T> {
  const live = pool();
  if (!live.length) return inThread();
  const slot = live[turn++ % live.length];
  const id = nextId++;
  return new Promise<T>((resolve, reject) => {
    slot.pending.set(id, { resolve: resolve as (v: unknown) => void, reject });
    slot.worker.ref();
    slot.worker.postMessage({ id, op, a, b });
  });
}

/** Hash a password for storage. */
export function hashPassword(password: string, cost = BCRYPT_COST): Promise<string> {
  const input = prehash(password);
  return run("hash", input, cost, () => bcrypt.hash(input, cost));
}

/** Check a password against a stored hash. */
export function verifyPassword(password: string, hash: string): Promise<boolean> {
  const input = prehash(password);
  return run("compare", input, hash, () => bcrypt.compare(input, hash));
}
