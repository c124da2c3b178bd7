import type { Route } from "./+types/api.v1.submissions.$id.review";
import { assertSameOrigin, requireCan } from "~/services/guards.server";
import { methodNotAllowed, readJson } from "~/services/http.server";
import { submissionApiError } from "~/services/submission-http.server";
import { decide, submissionJson, viewSubmission } from "~/services/submissions.server";
import { reviewBody } from "~/validation/submissions";

export const loader = () => methodNotAllowed("POST");

/** A moderator approves (publishes a revision), returns with a question, or declines with a reason; 409 when stale. */
export async function action({ request, params }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  assertSameOrigin(request);
  const { user } = await requireCan(request, "review.work");
  const body = await readJson(request, reviewBody);
  if (!body.ok) return body.response;
  const id = /^\d{1,9}$/.test(params.id) ? Number(params.id) : NaN;
  try {
    // decide() answers 404 for no such submission; the full view is built once, after the decision.
    const outcome = await decide(user, id, body.data);
    return Response.json({ submission: submissionJson((await viewSubmission(user, id))!), outcome }, { headers: { "Cache-Control": "private, no-store" } });
  } catch (e) {
    return submissionApiError(e);
  }
}
