import type { Route } from "./+types/api.v1.submissions";
import { assertSameOrigin, requireCan, requireUser } from "~/services/guards.server";
import { methodNotAllowed, readJson, validationError } from "~/services/http.server";
import { listSubmissions, startSubmission, submissionJson, viewSubmission } from "~/services/submissions.server";
import { submissionApiError } from "~/services/submission-http.server";
import { createSubmissionBody, listSubmissionsQuery } from "~/validation/submissions";
import { searchParams } from "~/validation/library";

const noStore = { "Cache-Control": "private, no-store" };

/** Submissions: a contributor's own; a moderator's view of all (`state=in_review` is the queue, oldest first). */
export async function loader({ request }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const q = listSubmissionsQuery.safeParse(searchParams(request));
  if (!q.success) return validationError(q.error.issues);
  const { submissions, total } = await listSubmissions(user, { ...q.data, mine: !!q.data.mine });
  return Response.json({ submissions, total, limit: q.data.limit, offset: q.data.offset }, { headers: noStore });
}

/** Start a draft (a new card, a new card with a family request, or an edit of a published card); `submit: true` sends it for review at once. */
export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("GET, POST");
  assertSameOrigin(request);
  const { user } = await requireCan(request, "submission.create");
  const body = await readJson(request, createSubmissionBody);
  if (!body.ok) return body.response;
  try {
    const { id, created } = await startSubmission(user, body.data);
    const view = await viewSubmission(user, id);
    return Response.json(
      { submission: submissionJson(view!) },
      { status: created ? 201 : 200, headers: { ...noStore, Location: `/api/v1/submissions/${id}` } },
    );
  } catch (e) {
    return submissionApiError(e);
  }
}
