import { data, Form, Link, redirect } from "react-router";
import type { Route } from "./+types/contribute";
import { FormMessage } from "~/components/field";
import { requireCan } from "~/services/guards.server";
import { listFamilies, listMakes } from "~/services/library.server";
import { submissionApiError } from "~/services/submission-http.server";
import { listSubmissions, newIdempotencyKey, SubmissionError, startSubmission } from "~/services/submissions.server";
import { cardsByFamily } from "~/services/library.server";
import { contributeForm, familyRequestFromForm, familyRequestSchema } from "~/validation/submissions";
import { fieldErrors, formFields } from "~/validation/forms";
import { contributeQuery } from "~/validation/pages";
import { searchParams } from "~/validation/library";

export const meta: Route.MetaFunction = () => [{ title: "Contribute · Loomlore" }];

export async function loader({ request }: Route.LoaderArgs) {
  const { user } = await requireCan(request, "submission.create");
  const [{ families }, makes, mine, cards] = await Promise.all([
    listFamilies({ limit: 100, offset: 0 }),
    listMakes(),
    listSubmissions(user, { mine: true, limit: 100, offset: 0 }),
    cardsByFamily(),
  ]);
  const edit = contributeQuery.parse(searchParams(request)).card;
  return { families, makes, mine: mine.submissions, cards, edit, key: newIdempotencyKey() };
}

type Errors = Record<string, string>;

/** Start a draft: a new card in a family, a new card with a family request, or an edit of a published card. */
export async function action({ request }: Route.ActionArgs) {
  const { user } = await requireCan(request, "submission.create");
  const form = await request.formData();
  const fail = (errors: Errors, status = 400) => data({ errors }, { status });
  const chosen = contributeForm.safeParse(formFields(form));
  if (!chosen.success) {
    const { intent, ...errors } = fieldErrors(chosen.error.issues);
    return fail(intent ? { form: intent } : errors);
  }
  const c = chosen.data;
  try {
    let started;
    if (c.intent === "edit") started = await startSubmission(user, { connector: c.card, idempotencyKey: c.key });
    else if (c.intent === "new") started = await startSubmission(user, { family: c.family, idempotencyKey: c.key });
    else {
      const parsed = familyRequestSchema.safeParse(familyRequestFromForm(form));
      if (!parsed.success) {
        const errors: Errors = {};
        for (const i of parsed.error.issues) errors[`familyRequest.${i.path.join(".")}`] ??= i.message;
        return fail(errors);
      }
      started = await startSubmission(user, { familyRequest: parsed.data, idempotencyKey: c.key });
    }
    throw redirect(`/submissions/${started.id}`);
  } catch (e) {
    if (e instanceof Response) throw e;
    if (e instanceof SubmissionError) return fail({ [e.field ?? "form"]: e.message }, e.status);
    const r = submissionApiError(e);
    return fail({ form: "That did not work; try again in a minute." }, r.status);
  }
}

const input = "mt-1 block w-full rounded border-2 border-ink bg-white px-2 py-1.5 font-normal";

export default function Contribute({ loaderData, actionData }: Route.ComponentProps) {
  const { families, makes, mine, cards, edit, key } = loaderData;
  const errors: Errors = actionData?.errors ?? {};
  const err = (k: string) =>
    errors[k] ? (
      <span id={`${k}-error`} className="block text-sm text-signal-dark">
        {errors[k]}
      </span>
    ) : null;
  return (
    <div className="space-y-8">
      <header>
        <h1 className="text-3xl font-bold">Contribute a connector card</h1>
        <p className="mt-2 max-w-3xl text-lg">
          Photograph the connector on your own bike, fill in its pin map, and say how you know. A moderator checks every submission against the library before
          it is published; you are told by e-mail.
        </p>
      </header>
      <FormMessage error={errors.form} />
      <div className="grid gap-6 md:grid-cols-2">
        <Form method="post" className="space-y-3 rounded-md border border-rule bg-white p-4">
          <h2 className="text-xl font-bold">Correct or complete a published card</h2>
          <input type="hidden" name="intent" value="edit" />
          <input type="hidden" name="key" value={`${key}-edit`} />
          <label className="block text-sm font-semibold">
            Card
            <select
              name="card"
              defaultValue={edit}
              className={input}
              aria-invalid={errors.card ? true : undefined}
              aria-describedby={errors.card ? "card-error" : undefined}
            >
              <option value="">choose…</option>
              {cards.map((f) => (
                <optgroup key={f.family.slug} label={`${f.family.make} ${f.family.name}`}>
                  {f.cards.map((c) => (
                    <option key={c.slug} value={c.slug}>
                      {c.name}
                    </option>
                  ))}
                </optgroup>
              ))}
            </select>
            {err("card")}
          </label>
          <p className="text-sm text-muted">Your edit starts from the card as published now.</p>
          <button className="rounded bg-ink px-4 py-2 font-semibold text-paper">Start the edit</button>
        </Form>
        <Form method="post" className="space-y-3 rounded-md border border-rule bg-white p-4">
          <h2 className="text-xl font-bold">Add a new card</h2>
          <input type="hidden" name="intent" value="new" />
          <input type="hidden" name="key" value={`${key}-new`} />
          <label className="block text-sm font-semibold">
            Family
            <select
              name="family"
              className={input}
              aria-invalid={errors.family ? true : undefined}
              aria-describedby={errors.family ? "family-error" : undefined}
            >
              <option value="">choose…</option>
              {families.map((f) => (
                <option key={f.slug} value={f.slug}>
                  {f.make.name} {f.name} ({f.yearFrom}–{f.yearTo})
                </option>
              ))}
            </select>
            {err("family")}
          </label>
          <button className="rounded bg-ink px-4 py-2 font-semibold text-paper">Start a new card</button>
        </Form>
      </div>
      <details className="rounded-md border border-rule bg-white p-4" open={Object.keys(errors).some((k) => k.startsWith("familyRequest."))}>
        <summary className="cursor-pointer text-xl font-bold">The family is not in the library yet</summary>
        <Form method="post" className="mt-3 grid gap-3 sm:grid-cols-2" noValidate>
          <input type="hidden" name="intent" value="family-request" />
          <input type="hidden" name="key" value={`${key}-family`} />
          <label className="text-sm font-semibold">
            Make
            <select name="familyRequest.make" className={input}>
              {makes.map((m) => (
                <option key={m.slug} value={m.slug}>
                  {m.name}
                </option>
              ))}
            </select>
            {err("familyRequest.make")}
          </label>
          {(
            [
              ["name", "Family name", "e.g. RX550 Four"],
              ["modelRange", "Models", "e.g. RX550, RX550 S"],
              ["yearFrom", "First year", "1977"],
              ["yearTo", "Last year", "1981"],
              ["engine", "Engine layout", "e.g. inline four"],
              ["cylinders", "Cylinders", "4"],
              ["displacementCc", "Displacement (cc)", "550"],
              ["firingOrder", "Firing order", "1-2-4-3"],
              ["ignition", "Ignition", "e.g. battery-powered transistor"],
            ] as const
          ).map(([k, label, ph]) => (
            <label key={k} className="text-sm font-semibold">
              {label}
              <input
                name={`familyRequest.${k}`}
                placeholder={ph}
                className={input}
                inputMode={["yearFrom", "yearTo", "cylinders", "displacementCc"].includes(k) ? "numeric" : undefined}
                aria-invalid={errors[`familyRequest.${k}`] ? true : undefined}
              />
              {err(`familyRequest.${k}`)}
            </label>
          ))}
          <p className="text-sm text-muted sm:col-span-2">The moderator who publishes your card adds the family with it.</p>
          <div className="sm:col-span-2">
            <button className="rounded bg-ink px-4 py-2 font-semibold text-paper">Start a card for this family</button>
          </div>
        </Form>
      </details>
      <section aria-labelledby="mine">
        <h2 id="mine" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Your submissions
        </h2>
        {mine.length ? (
          <table className="mt-2 w-full border-collapse bg-white text-left">
            <thead>
              <tr className="border-b border-rule text-sm">
                <th scope="col" className="p-2">
                  Card
                </th>
                <th scope="col" className="p-2">
                  Family
                </th>
                <th scope="col" className="p-2">
                  State
                </th>
                <th scope="col" className="p-2">
                  Latest
                </th>
              </tr>
            </thead>
            <tbody>
              {mine.map((s) => (
                <tr key={s.id} className="border-b border-rule align-top">
                  <td className="p-2">
                    <Link to={`/submissions/${s.id}`} className="font-semibold text-signal-dark underline">
                      {s.title}
                    </Link>{" "}
                    <span className="text-sm text-muted">{s.kind === "edit" ? "edit" : "new card"}</span>
                  </td>
                  <td className="p-2">{s.family?.name ?? (s.familyRequest ? `${s.familyRequest.name} (requested)` : "—")}</td>
                  <td className="p-2">
                    <span data-state={s.state} className="rounded border border-ink px-1.5 py-0.5 text-sm font-semibold">
                      {s.stateLabel}
                    </span>
                  </td>
                  <td className="p-2 text-sm">
                    {s.lastMessage ? (
                      <>
                        {s.lastMessage.kind === "question" ? "Question: " : s.lastMessage.kind === "decline" ? "Reason: " : ""}
                        {s.lastMessage.text.slice(0, 140)}
                      </>
                    ) : (
                      "—"
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : (
          <p className="mt-2 text-muted">Nothing yet.</p>
        )}
      </section>
    </div>
  );
}
