/** Who acts on a submission, and the refusals the submission services answer with (status, code, problems). */
import type { Submission } from "~db/models/index.ts";
import type { Role } from "~/domain/roles";
import type { Problem } from "~/domain/submissions";
import type { ApiErrorCode } from "../http.server";
import { apiError } from "../http.server";

export interface Actor {
  id: number;
  role: Role;
  displayName?: string;
}

/** A refusal with its HTTP status; `problems` lists what keeps a proposal from review or publication. */
export class SubmissionError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly field?: string,
    readonly problems: Problem[] = [],
    readonly current?: { state: string; version: number },
  ) {
    super(message);
  }
}

/** The API's error shape for a SubmissionError (with problems and, on a 409, the current state and version). */
export function submissionErrorResponse(e: SubmissionError): Response {
  const base = apiError(e.status, e.code, e.message, e.field);
  if (!e.problems.length && !e.current) return base;
  return Response.json(
    {
      error: {
        code: e.code,
        message: e.message,
        ...(e.field ? { field: e.field } : {}),
        ...(e.problems.length ? { problems: e.problems } : {}),
        ...(e.current ? { current: e.current } : {}),
      },
    },
    { status: e.status },
  );
}

export const notFound = () => new SubmissionError(404, "not_found", "There is no such submission.");
export const stale = (s: Submission) =>
  new SubmissionError(409, "conflict", "This submission changed since you opened it; reload to see its current state.", "version", [], {
    state: s.state,
    version: s.version,
  });
