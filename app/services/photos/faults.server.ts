/**
 * The photo pipeline's test-only hooks, read from the one test-faults seam (app/infra/faults.server.ts, set only by
 * test code; no environment variable reaches it):
 * - crashAt: mid-body|after-tmp|mid-sharp|after-rename|mid-insert: SIGKILL this process at that point of an upload.
 * - uploadFault: enospc:<n>: the n-th file write after the fault was set (or changed) fails with ENOSPC.
 */
import { faults } from "~/infra/faults.server";

export type CrashPoint = "mid-body" | "after-tmp" | "mid-sharp" | "after-rename" | "mid-insert";
export function crashAt(point: CrashPoint) {
  if (faults().crashAt === point) process.kill(process.pid, "SIGKILL");
}

let faultSpec: string | undefined;
let faultWrites = 0;
/** UPLOAD_FAULT=enospc:<n>: the error the n-th file write should fail with (counting restarts when the value changes). */
export function writeFault(): NodeJS.ErrnoException | null {
  const spec = faults().uploadFault;
  if (spec !== faultSpec) {
    faultSpec = spec;
    faultWrites = 0;
  }
  const m = spec ? /^enospc:(\d+)$/.exec(spec) : null;
  if (!m) return null;
  if (++faultWrites !== Number(m[1])) return null;
  return Object.assign(new Error("ENOSPC: no space left on device, write (UPLOAD_FAULT)"), { code: "ENOSPC", errno: -28, syscall: "write" });
}
