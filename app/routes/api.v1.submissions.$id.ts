import type { Route } from "./+types/api.v1.submissions.$id";
import { assertSameOrigin, requireUser } from "~/services/guards.server";
import { apiError, methodNotAllowed, readJson } from "~/services/http.server";
import { submissionApiError } from "~/services/submission-http.server";
import { submissionJson, updateSubmission, viewSubmission } from "~/services/submissions.server";
import { updateSubmissionBody } from "~/validation/submissions";

const noStore = { "Cache-Control": "private, no-store" };
const idOf = (raw: string) => (/^\d{1,9}$/.test(raw) ? Number(raw) : NaN);

/** One submission, for its author or a moderator; anyone else gets 404 (its existence does not leak). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const view = await viewSubmission(user, idOf(params.id));
  if (!view) return apiError(404, "not_found", "There is no such submission.");
  return Response.json({ submission: submissionJson(view) }, { headers: noStore });
}

/** The author saves, submits (`action: "submit"`) or answers a question and resubmits (`answer`), with the version read. */
export async function action({ request, params }: Route.ActionArgs) {
  if (!["PUT", "PATCH", "POST"].includes(request.method)) return methodNotAllowed("GET, PUT, PATCH, POST");
  assertSameOrigin(request);
  const { user } = await requireUser(request);
  const body = await readJson(request, updateSubmissionBody);
  if (!body.ok) return body.response;
  const id = idOf(params.id);
  try {
    // The service answers 404 for a submission that is not the caller's own (as for none at all): one full view, after.
    await updateSubmission(user, id, body.data);
    return Response.json({ submission: submissionJson((await viewSubmission(user, id))!) }, { headers: noStore });
  } catch (e) {
    return submissionApiError(e);
  }
}
