import { data, Form, Link } from "react-router";
import type { Route } from "./+types/submissions.$id";
import { CardDiffView } from "~/components/card-diff";
import { FormMessage } from "~/components/field";
import { PhotoUploader } from "~/components/photo-uploader";
import { ProposalEditor } from "~/components/proposal-editor";
import { applyEditorIntent } from "~/domain/proposal-edits";
import { SOURCE_KINDS, SOURCE_LABELS, type CardProposal, type Problem } from "~/domain/submissions";
import { requireCan, requireUser } from "~/services/guards.server";
import { renderNotes } from "~/services/markdown.server";
import { photoUrls } from "~/domain/photo-urls";
import { PhotoError, receivePhotos } from "~/services/photos.server";
import { submissionApiError } from "~/services/submission-http.server";
import { EDITOR_FORM_MAX_BYTES, readForm } from "~/services/http.server";
import { ownsSubmission, SubmissionError, updateSubmission, viewSubmission } from "~/services/submissions.server";
import { EDITOR_FORM_MAX_FIELDS, LIMITS, proposalFromForm, proposalSchema } from "~/validation/submissions";

export const meta: Route.MetaFunction = ({ loaderData }) => [
  { title: loaderData ? `${loaderData.s.content.name || "Untitled card"} (${loaderData.s.stateLabel}) · Loomlore` : "Submission · Loomlore" },
];

const idOf = (raw: string) => (/^\d{1,9}$/.test(raw) ? Number(raw) : NaN);

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  const s = await viewSubmission(user, idOf(params.id));
  if (!s) throw data("There is no such submission, or it is not yours.", { status: 404 });
  const photos = s.content.photos.map((p) => ({ ...p, ...photoUrls(p.id) }));
  return {
    s,
    photos,
    notesHtml: { before: s.before?.notes ? renderNotes(s.before.notes) : "", after: s.content.notes ? renderNotes(s.content.notes) : "" },
  };
}

type ActionResult = { notice?: string; error?: string; problems?: Problem[]; proposal?: unknown; fields?: Record<string, string> };

export async function action({ request, params }: Route.ActionArgs): Promise<ReturnType<typeof data<ActionResult>> | ActionResult> {
  const { user } = await requireCan(request, "submission.create");
  const id = idOf(params.id);
  if (!(await ownsSubmission(user, id))) throw data("There is no such submission, or it is not yours.", { status: 404 });

  // The plain photo form (without JavaScript): multipart to this page.
  if ((request.headers.get("Content-Type") ?? "").startsWith("multipart/form-data")) {
    try {
      const { photos } = await receivePhotos(request, user, { submissionId: id });
      return { notice: `${photos.length === 1 ? "One photo" : `${photos.length} photos`} added.` };
    } catch (e) {
      if (e instanceof PhotoError) return data({ error: e.message }, { status: e.status });
      throw e;
    }
  }

  // Read once, capped: the editor's largest honest form (200 pin rows, a 20 × 20 grid, 50 specs, 12 photos) has about
  // 2 600 fields; the server's body watch holds it to 1 MiB.
  const read = await readForm(request, { maxBytes: EDITOR_FORM_MAX_BYTES, maxFields: EDITOR_FORM_MAX_FIELDS });
  if (!read.ok) return data({ error: `${read.message} Nothing was saved.` }, { status: read.status });
  const form = read.form;
  const intent = String(form.get("intent") ?? "save");
  const version = Number(form.get("version"));
  const fields = {
    sourceKind: String(form.get("sourceKind") ?? ""),
    sourceDetail: String(form.get("sourceDetail") ?? ""),
    summary: String(form.get("summary") ?? ""),
    answer: String(form.get("answer") ?? ""),
  };
  let raw = proposalFromForm(form);
  let notice: string | undefined;
  // Editor buttons (add a row, move one, paste…) work without JavaScript: apply, then save the draft.
  if (!["save", "submit"].includes(intent)) {
    const parsedNow = proposalSchema.safeParse(raw);
    const applied = parsedNow.success
      ? applyEditorIntent(parsedNow.data, intent, {
          paste: String(form.get("paste") ?? ""),
          pasteMode: String(form.get("pasteMode") ?? ""),
          rows: String(form.get("layout.rows") ?? ""),
          cols: String(form.get("layout.cols") ?? ""),
        })
      : null;
    if (!parsedNow.success)
      return data({ error: "Some fields need fixing before that works.", problems: issues(parsedNow.error.issues), proposal: raw, fields }, { status: 400 });
    if (!applied) return data({ error: "Unknown request.", proposal: raw, fields }, { status: 400 });
    raw = applied.proposal;
    notice = applied.notice;
  }
  const parsed = proposalSchema.safeParse(raw);
  if (!parsed.success)
    return data(
      { error: "Some fields need fixing; nothing was saved yet, your entries are kept below.", problems: issues(parsed.error.issues), proposal: raw, fields },
      { status: 400 },
    );
  try {
    // Saved first, so a submission that is not ready yet keeps everything typed as a draft.
    await updateSubmission(user, id, {
      version,
      content: parsed.data as CardProposal,
      sourceKind: fields.sourceKind,
      sourceDetail: fields.sourceDetail,
      summary: fields.summary,
      action: "save",
    });
    if (intent !== "submit") return { notice: notice ?? "Draft saved." };
  } catch (e) {
    if (e instanceof SubmissionError) return data({ error: e.message, problems: e.problems, proposal: parsed.data, fields }, { status: e.status });
    const r = submissionApiError(e);
    return data({ error: "The library is busy; try again in a minute. Your entries are kept below.", proposal: parsed.data, fields }, { status: r.status });
  }
  try {
    await updateSubmission(user, id, { version: version + 1, action: "submit", answer: fields.answer });
    return { notice: "Sent for review. A moderator will look at it; you will be told by e-mail." };
  } catch (e) {
    if (e instanceof SubmissionError)
      return data({ error: `Saved as a draft, not sent yet. ${e.message}`, problems: e.problems, fields }, { status: e.status });
    const r = submissionApiError(e);
    return data({ error: "The library is busy; try again in a minute. Your entries are kept below.", proposal: parsed.data, fields }, { status: r.status });
  }
}

const issues = (list: { path: PropertyKey[]; message: string }[]): Problem[] => list.map((i) => ({ field: i.path.map(String).join("."), message: i.message }));

export default function SubmissionPage({ loaderData, actionData }: Route.ComponentProps) {
  const { s, photos, notesHtml } = loaderData;
  const result = (actionData ?? {}) as ActionResult;
  const proposal = (result.proposal as CardProposal | undefined) ?? s.content;
  const fields = result.fields ?? { sourceKind: s.sourceKind, sourceDetail: s.sourceDetail, summary: s.summary, answer: "" };
  const problems = result.problems ?? (s.canEdit ? s.problems : []);
  const lastQuestion = [...s.messages].reverse().find((m) => m.kind === "question");
  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <p className="text-sm text-muted">
          <Link to="/contribute" className="underline">
            Your submissions
          </Link>
          {s.family ? (
            <>
              {" "}
              · {s.family.make.name} {s.family.name}
            </>
          ) : s.familyRequest ? (
            <> · new family requested: {s.familyRequest.name}</>
          ) : null}
        </p>
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
                </Link>{" "}
                (from revision {s.baseRevision})
              </>
            ) : (
              "new card"
            )}
          </span>
          {s.state === "published" && s.connector ? (
            <Link to={`/connectors/${s.connector.slug}`} className="font-semibold text-signal-dark underline">
              See the published card (revision {s.publishedRevision})
            </Link>
          ) : null}
          {!s.mine && s.canReview ? (
            <Link to={`/review/${s.id}`} className="font-semibold text-signal-dark underline">
              Review it
            </Link>
          ) : null}
        </p>
      </header>
      <FormMessage error={result.error} notice={result.notice} />
      {s.stale ? (
        <p role="note" className="rounded border-l-4 border-signal bg-white px-3 py-2">
          The card was published again after this edit began; a moderator may ask you to start again from the current card.
        </p>
      ) : null}

      {s.messages.length ? (
        <section aria-labelledby="talk" className="rounded-md border border-rule bg-white p-4">
          <h2 id="talk" className="text-xl font-bold">
            Conversation
          </h2>
          <ol className="mt-2 space-y-2">
            {s.messages.map((m, i) => (
              <li key={i} className="border-l-4 border-rule pl-3">
                <p className="text-sm text-muted">
                  {m.author} · {messageLabel(m.kind)} · {new Date(m.createdAt).toLocaleString("en-GB", { timeZone: "UTC" })}
                </p>
                <p className="whitespace-pre-line">{m.text}</p>
              </li>
            ))}
          </ol>
        </section>
      ) : null}

      {s.canEdit ? (
        <>
          <Form method="post" id="proposal-form" className="space-y-6" noValidate>
            <input type="hidden" name="version" value={s.version} />
            {s.state === "returned" && lastQuestion ? (
              <section aria-labelledby="answer-h" className="rounded-md border-2 border-ink bg-white p-4">
                <h2 id="answer-h" className="text-xl font-bold">
                  The moderator asks
                </h2>
                <p className="mt-1 whitespace-pre-line">{lastQuestion.text}</p>
                <label className="mt-3 block text-sm font-semibold">
                  Your answer
                  <textarea
                    name="answer"
                    rows={3}
                    maxLength={LIMITS.message}
                    defaultValue={fields.answer}
                    className="mt-1 block w-full rounded border-2 border-ink px-2 py-1.5 font-normal"
                  />
                </label>
                <p className="text-sm text-muted">Change the card below if the question calls for it, then send it back.</p>
              </section>
            ) : null}
            <ProposalEditor proposal={proposal} colourSystem={s.colourSystem} houseStyle={s.houseStyle} familyCards={s.familyCards} problems={problems} />
            <fieldset className="rounded-md border border-rule bg-white p-4">
              <legend className="px-1 text-xl font-bold">Photos on this card</legend>
              {photos.length ? (
                <ul className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
                  {proposal.photos.map((p, i) => {
                    const urls = photos.find((x) => x.id === p.id);
                    return (
                      <li key={p.id} className="rounded border border-rule p-2">
                        <input type="hidden" name={`photos.${i}.id`} value={p.id} />
                        {urls ? (
                          <a href={urls.url}>
                            <img src={urls.thumbUrl} alt={p.caption || `Photo ${i + 1}`} className="h-32 w-full rounded object-cover" loading="lazy" />
                          </a>
                        ) : null}
                        <label className="mt-1 block text-sm font-semibold">
                          Caption
                          <input
                            name={`photos.${i}.caption`}
                            defaultValue={p.caption}
                            maxLength={200}
                            className="mt-1 block w-full rounded border border-ink px-2 py-1 font-normal"
                          />
                        </label>
                        <label className="mt-1 block text-sm font-semibold">
                          Credit
                          <input
                            name={`photos.${i}.credit`}
                            defaultValue={p.credit}
                            maxLength={120}
                            className="mt-1 block w-full rounded border border-ink px-2 py-1 font-normal"
                          />
                        </label>
                        <label className="mt-1 flex items-center gap-2 text-sm">
                          <input type="checkbox" name={`photos.${i}.remove`} value="1" /> Take this photo off the card
                        </label>
                      </li>
                    );
                  })}
                </ul>
              ) : (
                <p className="text-muted">No photos yet. Add them below: the connector itself, both faces if you can, and its place on the bike.</p>
              )}
            </fieldset>
            <fieldset className="space-y-3 rounded-md border border-rule bg-white p-4">
              <legend className="px-1 text-xl font-bold">How you know</legend>
              <div className="flex flex-wrap gap-4" id="ed-sourceKind" tabIndex={-1}>
                {SOURCE_KINDS.map((k) => (
                  <label key={k} className="flex items-center gap-2">
                    <input type="radio" name="sourceKind" value={k} defaultChecked={fields.sourceKind === k} /> {SOURCE_LABELS[k]}
                  </label>
                ))}
              </div>
              {problems.some((p) => p.field === "sourceKind") ? (
                <p id="sourceKind-error" className="text-sm font-semibold text-signal-dark">
                  {problems.find((p) => p.field === "sourceKind")!.message}
                </p>
              ) : null}
              <label className="block text-sm font-semibold">
                Details (the manual and page, the year of the bike you traced, what you measured with)
                <textarea
                  id="ed-sourceDetail"
                  name="sourceDetail"
                  rows={2}
                  maxLength={1000}
                  defaultValue={fields.sourceDetail}
                  className="mt-1 block w-full rounded border-2 border-ink px-2 py-1.5 font-normal"
                />
              </label>
              <label className="block text-sm font-semibold">
                What this changes, in a sentence (shown in the card's revision history)
                <input
                  name="summary"
                  maxLength={250}
                  defaultValue={fields.summary}
                  className="mt-1 block w-full rounded border-2 border-ink px-2 py-1.5 font-normal"
                />
              </label>
            </fieldset>
            <div className="flex flex-wrap gap-3">
              <button name="intent" value="save" className="rounded border-2 border-ink bg-white px-4 py-2 font-semibold">
                Save draft
              </button>
              <button name="intent" value="submit" className="rounded bg-ink px-4 py-2 font-semibold text-paper">
                {s.state === "returned" ? "Send answer and resubmit" : "Send for review"}
              </button>
            </div>
          </Form>
          <PhotoUploader
            submissionId={s.id}
            remaining={Math.max(0, LIMITS.photos - proposal.photos.length)}
            action={`/submissions/${s.id}`}
            version={s.version}
          />
        </>
      ) : (
        <section aria-label="What the submission changes" className="space-y-3">
          <CardDiffView
            diff={s.diff}
            colourSystem={s.colourSystem}
            houseStyle={s.houseStyle}
            photoUrl={(id, thumb) => (thumb ? photoUrls(id).thumbUrl : photoUrls(id).url)}
            notesHtml={notesHtml}
          />
        </section>
      )}
    </div>
  );
}

function messageLabel(kind: string) {
  return kind === "question" ? "question" : kind === "answer" ? "answer" : kind === "decline" ? "reason for declining" : "note on publishing";
}
