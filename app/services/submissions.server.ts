/**
 * Submissions and review: a contributor's draft of a new card or an edit, its way through review, and the atomic
 * publish. One decision = one IMMEDIATE transaction writing the submission (state, version + 1), the live card and its
 * revision snapshot, the conversation, the audit row, the outbox mail and the search index job (QUALITY "Design the
 * tests assume"). Every write to a submission is conditional on the version the writer read (optimistic locking).
 *
 * The way in for routes and tests; the work is in ./submissions/ (errors, context, draft photos, editing, reading,
 * review, publish, reports), one job a module.
 */
export { SubmissionError, submissionErrorResponse } from "./submissions/errors.server";
export { setDecisionFaultHook } from "./submissions/faults.server";
export { newIdempotencyKey, startSubmission, updateSubmission, type StartInput, type UpdateInput } from "./submissions/editing.server";
export {
  listSubmissions,
  ownsSubmission,
  reviewQueue,
  submissionJson,
  viewSubmission,
  type ListQuery,
  type SubmissionView,
} from "./submissions/reading.server";
export { decide, type Decision } from "./submissions/review.server";
export { closeReport, viewReport } from "./submissions/reports.server";
