/**
 * Test-only hooks of the photo pipeline, behind one seam (never set them in production):
 * - CRASH_AT=mid-body|after-tmp|mid-sharp|after-rename|mid-insert: SIGKILL this process at that point of an upload.
 * - UPLOAD_FAULT=enospc:<n>: the n-th file write after the variable was set (or changed) fails with ENOSPC.
 */

export type CrashPoint = "mid-body" | "after-tmp" | "mid-sharp" | "after-rename" | "mid-insert";
export function crashAt(point: CrashPoint) {
  if (process.env.CRASH_AT === point) process.kill(process.pid, "SIGKILL");
}

let faultSpec: string | undefined;
let faultWrites = 0;
/** UPLOAD_FAULT=enospc:<n>: the error the n-th file write should fail with (counting restarts when the value changes). */
export function writeFault(): NodeJS.ErrnoException | null {
  const spec = process.env.UPLOAD_FAULT;
  if (spec !== faultSpec) {
    faultSpec = spec;
    faultWrites = 0;
  }
  const m = spec ? /^enospc:(\d+)$/.exec(spec) : null;
  if (!m) return null;
  if (++faultWrites !== Number(m[1])) return null;
  return Object.assign(new Error("ENOSPC: no space left on device, write (UPLOAD_FAULT)"), { code: "ENOSPC", errno: -28, syscall: "write" });
}
