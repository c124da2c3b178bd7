import { data, Form, Link, redirect } from "react-router";
import type { Route } from "./+types/review.$id";
import { CardDiffView } from "~/components/card-diff";
import { FormMessage } from "~/components/field";
import { SOURCE_LABELS, type SourceKind } from "~/domain/submissions";
import { requireCan } from "~/services/guards.server";
import { renderNotes } from "~/services/markdown.server";
import { photoUrls } from "~/domain/photo-urls";
import { isBusyOrFull } from "~/services/submission-http.server";
import { closeReport, decide, SubmissionError, viewReport, viewSubmission } from "~/services/submissions.server";
import { LIMITS } from "~/domain/submissions";
import { fieldErrors, formFields, type Issue } from "~/validation/forms";
import { reportDecisionForm, submissionDecisionForm } from "~/validation/review";

export const meta: Route.MetaFunction = ({ loaderData }) => [
  { title: loaderData?.kind === "submission" ? `Review: ${loaderData.s.content.name || "Untitled card"} · Loomlore` : "Review a mistake report · Loomlore" },
];

/** `/review/12` is submission 12; `/review/report-3` is mistake report 3. */
function parseKey(raw: string): { kind: "submission" | "report"; id: number } | null {
  const m = /^(report-)?(\d{1,9})$/.exec(raw);
  return m ? { kind: m[1] ? "report" : "submission", id: Number(m[2]) } : null;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user } = await requireCan(request, "review.work");
  const key = parseKey(params.id);
  if (key?.kind === "report") {
    const r = await viewReport(user, key.id);
    if (!r) throw data("There is no such report.", { status: 404 });
    return { kind: "report" as const, r };
  }
  const s = key ? await viewSubmission(user, key.id) : null;
  if (!s) throw data("There is no such submission.", { status: 404 });
  return {
    kind: "submission" as const,
    s,
    notesHtml: { before: s.before?.notes ? renderNotes(s.before.notes) : "", after: s.content.notes ? renderNotes(s.content.notes) : "" },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { user } = await requireCan(request, "review.work");
  const key = parseKey(params.id);
  if (!key) throw data("There is no such item.", { status: 404 });
  const fields = formFields(await request.formData());
  const refuse = (issues: Issue[]) => data({ error: Object.values(fieldErrors(issues))[0] ?? "Choose what to do." }, { status: 400 });
  try {
    if (key.kind === "report") {
      const f = reportDecisionForm.safeParse(fields);
      if (!f.success) return refuse(f.error.issues);
      await closeReport(user, key.id, f.data.decision, f.data.message);
      throw redirect("/review?closed=report");
    }
    const f = submissionDecisionForm.safeParse(fields);
    if (!f.success) return refuse(f.error.issues);
    const { decision, message, version } = f.data;
    const outcome = await decide(user, key.id, { version, decision, message });
    if (outcome.connector) throw redirect(`/connectors/${outcome.connector}?published=${outcome.revision}`);
    throw redirect(`/review?done=${decision}`);
  } catch (e) {
    if (e instanceof Response) throw e;
    if (e instanceof SubmissionError) {
      const changed = e.status === 409 && e.current ? ` It is now ${e.current.state.replace("_", " ")}.` : "";
      return data({ error: e.message + changed, problems: e.problems.map((p) => p.message) }, { status: e.status });
    }
    if (isBusyOrFull(e)) return data({ error: "The library is busy or out of space; nothing was changed. Try again in a minute." }, { status: 503 });
    throw e;
  }
}

export default function ReviewItem({ loaderData, actionData }: Route.ComponentProps) {
  const result = (actionData ?? {}) as { error?: string; problems?: string[] };
  if (loaderData.kind === "report") {
    const { r } = loaderData;
    return (
      <div className="max-w-3xl space-y-5">
        <p className="text-sm">
          <Link to="/review" className="underline">
            Review queue
          </Link>
        </p>
        <h1 className="text-3xl font-bold">Mistake report on {r.connector.name}</h1>
        <FormMessage error={result.error} />
        <p>
          {r.reporter} reported on revision {r.revision} (the card is at revision {r.connector.revision}) · {r.family.name}
        </p>
        <blockquote className="border-l-4 border-ink bg-white p-3 whitespace-pre-line">{r.text}</blockquote>
        <p>
          {r.bikeChecked.count
            ? `${r.bikeChecked.count} ${r.bikeChecked.count === 1 ? "rider has" : "riders have"} checked this card on their bike${r.bikeChecked.years.length ? ` (${r.bikeChecked.years.join(", ")})` : ""}.`
            : "No rider has checked this card on their bike yet."}
        </p>
        <p>
          <Link to={`/connectors/${r.connector.slug}`} className="font-semibold text-signal-dark underline">
            Open the card
          </Link>{" "}
          ·{" "}
          <Link to={`/contribute?card=${r.connector.slug}`} className="font-semibold text-signal-dark underline">
            Start an edit to fix it
          </Link>
        </p>
        {r.status === "open" ? (
          <Form method="post" className="space-y-3 rounded-md border border-rule bg-white p-4">
            <label className="block text-sm font-semibold">
              What was done (kept in the log)
              <textarea
                name="message"
                rows={3}
                required
                maxLength={LIMITS.message}
                className="mt-1 block w-full rounded border-2 border-ink px-2 py-1.5 font-normal"
              />
            </label>
            <div className="flex flex-wrap gap-3">
              <button name="decision" value="resolved" className="rounded bg-ink px-4 py-2 font-semibold text-paper">
                Fixed: close the report
              </button>
              <button name="decision" value="dismissed" className="rounded border-2 border-ink bg-white px-4 py-2 font-semibold">
                Not a mistake: close it
              </button>
            </div>
          </Form>
        ) : (
          <p className="font-semibold">
            Closed ({r.status}): {r.resolution}
          </p>
        )}
      </div>
    );
  }
  const { s, notesHtml } = loaderData;
  return (
    <div className="space-y-6">
      <p className="text-sm">
        <Link to="/review" className="underline">
          Review queue
        </Link>
      </p>
      <header className="space-y-1">
        <h1 className="text-3xl font-bold">{s.content.name || "Untitled card"}</h1>
        <p className="flex flex-wrap items-center gap-2">
          <span data-testid="submission-state" data-state={s.state} className="rounded border-2 border-ink px-2 py-0.5 font-semibold">
            {s.stateLabel}
          </span>
          <span>
            {s.kind === "edit" ? (
              <>
                edit of{" "}
                <Link to={`/connectors/${s.connector!.slug}`} className="underline">
                  {s.connector!.name}
                </Link>
                , from revision {s.baseRevision}
              </>
            ) : (
              "new card"
            )}{" "}
            · from {s.author.displayName}
          </span>
          <span>
            ·{" "}
            {s.family
              ? `${s.family.make.name} ${s.family.name}`
              : s.familyRequest
                ? `new family requested: ${s.familyRequest.name} (${s.familyRequest.yearFrom}–${s.familyRequest.yearTo}, ${s.familyRequest.cylinders} cyl., ${s.familyRequest.displacementCc} cc)`
                : ""}
          </span>
        </p>
      </header>
      <FormMessage error={result.error} />
      {result.problems?.length ? (
        <ul className="list-disc pl-5 text-signal-dark">
          {result.problems.slice(0, 10).map((p, i) => (
            <li key={i}>{p}</li>
          ))}
        </ul>
      ) : null}
      {s.stale ? (
        <p role="note" className="rounded border-l-4 border-signal bg-white px-3 py-2">
          The card was published again (now revision {s.connector!.revision}) after this edit began from revision {s.baseRevision}. Approving is refused; return
          it so the contributor starts from the current card.
        </p>
      ) : null}
      <section className="grid gap-4 md:grid-cols-3">
        <div className="rounded-md border border-rule bg-white p-3">
          <h2 className="font-bold">How they know</h2>
          <p>{SOURCE_LABELS[s.sourceKind as SourceKind] ?? "not given"}</p>
          {s.sourceDetail ? <p className="text-sm whitespace-pre-line">{s.sourceDetail}</p> : null}
        </div>
        <div className="rounded-md border border-rule bg-white p-3">
          <h2 className="font-bold">Riders on the published card</h2>
          <p>
            {s.connector
              ? s.bikeChecked.count
                ? `${s.bikeChecked.count} bike-checked${s.bikeChecked.years.length ? ` (${s.bikeChecked.years.join(", ")})` : ""}`
                : "Not bike-checked yet"
              : "A new card: nobody has checked it yet."}
          </p>
          {s.openReports.length ? (
            <p className="text-sm">
              {s.openReports.length} open mistake {s.openReports.length === 1 ? "report" : "reports"}:{" "}
              {s.openReports.map((r) => (
                <span key={r.id} className="block">
                  “{r.text.slice(0, 100)}”
                </span>
              ))}
            </p>
          ) : null}
        </div>
        <div className="rounded-md border border-rule bg-white p-3">
          <h2 className="font-bold">Summary</h2>
          <p className="text-sm">{s.summary || "—"}</p>
        </div>
      </section>
      {s.messages.length ? (
        <section className="rounded-md border border-rule bg-white p-3">
          <h2 className="font-bold">Conversation</h2>
          <ol className="mt-1 space-y-1">
            {s.messages.map((m, i) => (
              <li key={i}>
                <span className="text-sm text-muted">
                  {m.author} ({m.kind}):
                </span>{" "}
                <span className="whitespace-pre-line">{m.text}</span>
              </li>
            ))}
          </ol>
        </section>
      ) : null}
      <section aria-label="What the submission changes" className="space-y-3">
        <p className="rounded border-l-4 border-ink bg-white px-3 py-2 text-sm">
          Check each photo for people, number plates, addresses or anything else personal in frame; location and camera data were removed on upload.
        </p>
        <CardDiffView
          diff={s.diff}
          colourSystem={s.colourSystem}
          houseStyle={s.houseStyle}
          photoUrl={(id, thumb) => (thumb ? photoUrls(id).thumbUrl : photoUrls(id).url)}
          notesHtml={notesHtml}
        />
      </section>
      {s.canReview ? (
        <Form method="post" className="space-y-3 rounded-md border-2 border-ink bg-white p-4" aria-labelledby="decide">
          <h2 id="decide" className="text-xl font-bold">
            Decision
          </h2>
          <input type="hidden" name="version" value={s.version} />
          <label className="block text-sm font-semibold">
            Question, reason or note (the contributor reads it; a question or reason is needed to return or decline)
            <textarea name="message" rows={3} maxLength={LIMITS.message} className="mt-1 block w-full rounded border-2 border-ink px-2 py-1.5 font-normal" />
          </label>
          <div className="flex flex-wrap gap-3">
            <button name="decision" value="approve" className="rounded bg-ink px-4 py-2 font-semibold text-paper">
              Approve and publish
            </button>
            <button name="decision" value="return" className="rounded border-2 border-ink bg-white px-4 py-2 font-semibold">
              Return with a question
            </button>
            <button name="decision" value="decline" className="rounded border-2 border-signal bg-white px-4 py-2 font-semibold text-signal-dark">
              Decline
            </button>
          </div>
        </Form>
      ) : s.mine && s.state === "in_review" ? (
        <p className="font-semibold">This is your own submission; another moderator reviews it.</p>
      ) : (
        <p className="font-semibold">This submission is {s.stateLabel}; there is nothing to decide.</p>
      )}
    </div>
  );
}
