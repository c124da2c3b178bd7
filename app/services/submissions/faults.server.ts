// D4 (QUALITY): a test may inject a throw after each write of a decision to prove the whole decision rolls back.
export type FaultPoint = "submission" | "card" | "revision" | "message" | "audit" | "outbox" | "index";
let faultHook: ((point: FaultPoint) => void) | null = null;
/** Test only: call `hook` after each write of a decision (throwing from it must roll everything back). */
export function setDecisionFaultHook(hook: typeof faultHook) {
  faultHook = hook;
}
export const wrote = (point: FaultPoint) => faultHook?.(point);
