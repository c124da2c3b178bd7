/**
 * How long the event loop was held: no request may block it for more than about 50 ms of work (heavy work, bcrypt and
 * sharp, runs on other threads). Node's own monitor (perf_hooks.monitorEventLoopDelay) samples the delay all the time;
 * the health route reports the largest and the 99th percentile since the previous health check, so a poller (or a
 * test) sees what happened between two of its reads.
 */
import { monitorEventLoopDelay, type IntervalHistogram } from "node:perf_hooks";

let histogram: IntervalHistogram | null = null;
let since = Date.now();

/** Start sampling (idempotent; the health route's module starts it when the server loads). */
export function watchEventLoop(): void {
  if (histogram) return;
  histogram = monitorEventLoopDelay({ resolution: 10 });
  histogram.enable();
  since = Date.now();
}

export interface EventLoopReport {
  maxMs: number;
  p99Ms: number;
  windowS: number;
}

/** The delay since the previous report (or since start), in milliseconds; the window starts again. */
export function eventLoopReport(): EventLoopReport {
  watchEventLoop();
  const h = histogram!;
  // The histogram is in nanoseconds and counts the sampling interval itself: a loop that is never held reads ≈ 10 ms.
  const ms = (ns: number) => (Number.isFinite(ns) && h.count > 0 ? Math.round(ns / 1e5) / 10 : 0);
  const report = { maxMs: ms(h.max), p99Ms: ms(h.percentile(99)), windowS: Math.round((Date.now() - since) / 100) / 10 };
  h.reset();
  since = Date.now();
  return report;
}
