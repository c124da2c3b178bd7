/** Submissions' errors as API responses: SubmissionError keeps its status; a schema failure is a 400. */
import { ZodError } from "zod";
import { apiError, validationError } from "./http.server";
import { SubmissionError, submissionErrorResponse } from "./submissions.server";

/** Map a thrown error to the API's error shape; anything unexpected is rethrown (a 500 with an error id). */
export function submissionApiError(e: unknown): Response {
  if (e instanceof SubmissionError) return submissionErrorResponse(e);
  if (e instanceof ZodError) return validationError(e.issues);
  if (e instanceof Response) return e;
  if (isBusyOrFull(e)) return apiError(503, "unavailable", "The library is busy or out of space; try again in a minute.", undefined, { "Retry-After": "30" });
  throw e;
}

/** SQLITE_BUSY (another writer held the database past busy_timeout) or SQLITE_FULL: retryable, never a 500. */
export function isBusyOrFull(e: unknown): boolean {
  const code =
    (e as { parent?: { code?: string }; original?: { code?: string }; code?: string })?.parent?.code ??
    (e as { original?: { code?: string } })?.original?.code ??
    (e as { code?: string })?.code;
  return code === "SQLITE_BUSY" || code === "SQLITE_FULL";
}
