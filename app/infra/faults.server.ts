/**
 * Test-only fault switches, behind one seam. Production code asks `faults()` at the points a test may break (an upload
 * killed mid-way, a disk that fills, a database file at its cap); nothing in production turns one on. Only code sets
 * them: a test calls `setFaults()` in its own process (a crash test's child process does so itself). No environment
 * variable reaches them, so a stray one in a real environment (CRASH_AT, say) does nothing. Kept on globalThis, so two
 * copies of this module (source and bundle) see the same switches.
 */
export interface Faults {
  /** SIGKILL the process when an upload reaches this point (photos: mid-body, after-tmp, mid-sharp, after-rename, mid-insert). */
  crashAt?: string;
  /** `enospc:<n>`: the n-th file write of an upload fails with ENOSPC. */
  uploadFault?: string;
  /** PRAGMA max_page_count on the write handle, so a write fails with SQLITE_FULL (QUALITY D9). */
  maxPageCount?: number;
}

const key = Symbol.for("loomlore.test-faults");
type Holder = { [key]?: Faults };

/** The faults switched on (none, outside tests). */
export function faults(): Faults {
  return (globalThis as Holder)[key] ?? {};
}

/** Switch faults on (tests only); `{}` switches them all off. */
export function setFaults(f: Faults): void {
  (globalThis as Holder)[key] = { ...f };
}
