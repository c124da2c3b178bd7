import { data, Form, Link } from "react-router";
import type { Route } from "./+types/connectors.$connector";
import { CardPhotos } from "~/components/card-photos";
import { CardSpecs } from "~/components/card-specs";
import { Cautions, type CautionKind } from "~/components/cautions";
import { ColourChip } from "~/components/colour-chip";
import { FaceView } from "~/components/face-view";
import { faceGeometry } from "~/domain/connector-face";
import { splitSharedConditions } from "~/domain/specs";
import { tooMany } from "~/services/http.server";
import { answered, fieldErrors, formFields, refusal } from "~/validation/forms";
import { cardActionForm } from "~/validation/garage";
import { takeAction } from "~/services/rate-limit.server";
import { can } from "~/domain/roles";
import { checkCard, reportMistake, riderCardState, saveCard } from "~/services/garage.server";
import { optionalUser, requireCan } from "~/services/guards.server";
import { getConnectorCard } from "~/services/library.server";
import { renderNotes } from "~/services/markdown.server";
import { cardPageQuery } from "~/validation/pages";
import { searchParams } from "~/validation/library";

export const meta: Route.MetaFunction = ({ loaderData }) => [
  { title: loaderData ? `${loaderData.card.name} · ${loaderData.card.family.make.name} ${loaderData.card.family.name} · Loomlore` : "Not found · Loomlore" },
];

export async function loader({ params, request }: Route.LoaderArgs) {
  const found = await getConnectorCard(params.connector);
  if (!found) throw data(`There is no connector card “${params.connector}” in the library.`, { status: 404 });
  const { view, cavity, published } = cardPageQuery.parse(searchParams(request));
  const card = found.connector;
  const user = await optionalUser(request);
  return {
    card,
    rider: user ? { role: user.role, ...(await riderCardState(user.id, card.id)) } : null,
    view,
    highlight: card.pins.some((p) => p.cavity === cavity) ? cavity : null,
    // After a moderator's approval the review page lands here with ?published=<revision>.
    published: published === card.revision.number ? card.revision.number : null,
    notesHtml: card.notes ? renderNotes(card.notes) : "",
  } as const;
}

// Retry-After (and any other header an action sets) reaches the browser on a document request too.
export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => (actionHeaders.has("Retry-After") ? actionHeaders : loaderHeaders);

/** A rider's refused repeat of a limited action: 429 with Retry-After. */
const limitedAnswer = (retryAfterS: number) =>
  data(refusal({ form: `You have done that many times this hour. Try again in ${Math.ceil(retryAfterS / 60)} minute(s).` }), tooMany(retryAfterS));
const noSuchCard = () => data(refusal({ form: "No such card." }), { status: 404 });

/** What each intent needs: the role, and the hourly limit it counts against. */
const INTENTS = { save: ["garage.save", "garage-add"], check: ["card.check", "bike-check"], report: ["card.report", "report"] } as const;

/**
 * A rider's actions on a card: save it, confirm it on their bike, report a mistake. Each checks its own role and its
 * limit first, then the form (app/validation/garage.ts).
 */
export async function action({ request, params }: Route.ActionArgs) {
  const fields = formFields(await request.formData());
  const intent = fields.intent as keyof typeof INTENTS;
  if (!Object.hasOwn(INTENTS, intent)) return data(refusal({ form: "Unknown request." }), { status: 400 });
  const [role, limit] = INTENTS[intent];
  const { user } = await requireCan(request, role);
  const limited = await takeAction(limit, user.id);
  if (!limited.ok) return limitedAnswer(limited.retryAfterS);
  const parsed = cardActionForm.safeParse(fields);
  // The card's forms are one line each: the first problem is the whole answer.
  if (!parsed.success) return data(refusal({ form: Object.values(fieldErrors(parsed.error.issues))[0] ?? "Unknown request." }, fields), { status: 400 });
  const f = parsed.data;
  if (f.intent === "save") return (await saveCard(user.id, params.connector)) ? answered("Saved to your garage.") : noSuchCard();
  if (f.intent === "check") return (await checkCard(user.id, params.connector, f.year)) ? answered("Thanks: marked as checked on your bike.") : noSuchCard();
  return (await reportMistake(user.id, params.connector, f.text)) ? answered("Thanks: a moderator will look at your report.") : noSuchCard();
}

const LATCH_WORDS = { top: "latch at the top", bottom: "latch at the bottom", left: "latch on the left", right: "latch on the right" } as const;

export default function ConnectorCardPage({ loaderData, actionData }: Route.ComponentProps) {
  const { card, view, highlight, notesHtml, rider, published } = loaderData;
  const { shared: sharedConditions, rest: ownConditions } = splitSharedConditions(card.specs.map((s) => s.conditions));
  const geometry = faceGeometry(card.layout, { view });
  const cautions: CautionKind[] =
    card.system === "ignition" ? ["ignition", "battery"] : card.system === "starting" || card.system === "charging" ? ["battery", "fuel"] : ["battery"];
  const here = `/connectors/${card.slug}`;
  const viewLink = (v: "mating" | "wire") =>
    `${here}${v === "wire" ? "?view=wire" : ""}${highlight ? `${v === "wire" ? "&" : "?"}cavity=${encodeURIComponent(highlight)}` : ""}`;
  return (
    <article className="card-sheet space-y-5 print:space-y-0">
      <nav aria-label="Breadcrumb" className="no-print text-sm">
        <Link to="/" className="underline">
          Library
        </Link>{" "}
        ›{" "}
        <Link to={`/makes/${card.family.make.slug}`} className="underline">
          {card.family.make.name}
        </Link>{" "}
        ›{" "}
        <Link to={`/families/${card.family.slug}`} className="underline">
          {card.family.name}
        </Link>{" "}
        › {card.systemName}
      </nav>
      {published ? (
        <p role="status" className="no-print rounded border-l-4 border-ink bg-white px-3 py-2 font-semibold">
          Published: this is revision {published}. The contributor has been told by e-mail.
        </p>
      ) : null}
      <header className="card-sheet-head flex flex-wrap items-start justify-between gap-3 print:block">
        <div>
          <p className="text-sm font-semibold tracking-wide text-muted uppercase">
            {card.family.make.name} {card.family.name} · {card.family.yearFrom}–{card.family.yearTo} · {card.systemName}
          </p>
          <h1 className="text-3xl font-bold print:text-xl">{card.name}</h1>
          <p className="mt-1">
            {card.housing} · {card.gender} · {card.location}
            {card.matesWith ? (
              <>
                {" "}
                · mates with{" "}
                <Link to={`/connectors/${card.matesWith}`} className="font-semibold text-signal-dark">
                  {card.mateName}
                </Link>
              </>
            ) : null}
          </p>
        </div>
        <div className="text-sm sm:text-right print:mt-1 print:flex print:gap-3 print:text-[8pt]">
          <p className="font-semibold" data-testid="revision">
            Revision {card.revision.number}
          </p>
          <p className="text-muted">published {card.revision.publishedAt.slice(0, 10)}</p>
          <p className="text-muted" data-testid="bike-checked">
            {card.bikeChecked} {card.bikeChecked === 1 ? "rider" : "riders"} bike-checked
            {card.bikeCheckedYears.length ? ` (${card.bikeCheckedYears.join(", ")})` : ""}
          </p>
        </div>
      </header>

      <div className="card-sheet-body grid gap-5 lg:grid-cols-[minmax(280px,420px)_1fr]">
        <section aria-labelledby="face-heading" className="card-sheet-face print-avoid-break">
          <h2 id="face-heading" className="sr-only">
            Face view
          </h2>
          <div role="group" aria-label="Which side you are looking at" className="no-print mb-2 inline-flex overflow-hidden rounded border-2 border-ink">
            {(["mating", "wire"] as const).map((v) => (
              <Link
                key={v}
                to={viewLink(v)}
                aria-current={view === v ? "true" : undefined}
                preventScrollReset
                className={`px-3 py-1.5 font-semibold no-underline ${view === v ? "bg-ink text-paper" : "bg-white text-ink hover:bg-paper"}`}
              >
                {v === "mating" ? "Mating face" : "Wire side"}
              </Link>
            ))}
          </div>
          <div className="rounded-md border border-rule bg-white p-2 print:p-1">
            <FaceView
              geometry={geometry}
              paint={card.paint.map((p) => ({
                ...p,
                href: `${viewLink(view).split("?")[0]}?${view === "wire" ? "view=wire&" : ""}cavity=${encodeURIComponent(p.cavity)}#pin-${p.cavity}`,
              }))}
              highlight={highlight}
              caption={`${view === "mating" ? "Mating face" : "Wire side"} of ${card.name}`}
            />
          </div>
          <p className="card-sheet-caption mt-2 text-sm print:mt-0 print:text-[8pt] print:leading-tight" data-testid="view-caption">
            {view === "mating"
              ? "Seen from the mating face: looking into the cavities, as when the two halves are apart."
              : "Seen from the wire side: where the wires enter the housing. This is the mirror image of the mating face."}{" "}
            Pin 1 is marked ▼; {LATCH_WORDS[geometry.latch]}.
          </p>
        </section>

        <section aria-labelledby="pins-heading" className="min-w-0">
          <h2 id="pins-heading" className="text-xl font-bold print:text-base">
            Pin map
          </h2>
          <ol className="mt-2 space-y-2 md:hidden print:hidden" aria-label="Pin map, one cavity at a time">
            {card.pins.map((p, i) => (
              <li
                key={p.cavity}
                aria-current={highlight === p.cavity ? "true" : undefined}
                className={`rounded-md border bg-white p-3 ${highlight === p.cavity ? "border-caution-edge bg-caution" : "border-rule"}`}
              >
                <p className="flex flex-wrap items-baseline gap-x-3">
                  <span className="text-lg font-bold">
                    Cavity {p.cavity}
                    {p.cavity === card.layout.pin1 ? " ▼" : ""}
                  </span>
                  <code className="text-lg font-semibold">{p.colour.code ?? "—"}</code>
                  <ColourChip baseHex={card.paint[i]?.baseHex ?? null} tracerHexes={card.paint[i]?.tracerHexes ?? []} words={p.colour.description} />
                </p>
                <p className="mt-1 text-sm">
                  {p.circuit}
                  {p.terminal ? ` · terminal ${p.terminal}` : ""}
                  {p.colour.iec ? ` · IEC ${p.colour.iec}` : ""}
                </p>
                {p.destinations.length > 0 ? (
                  <p className="mt-1 text-sm">
                    Goes to:{" "}
                    {p.destinations.map((d, j) => (
                      <span key={j}>
                        {j > 0 ? "; " : ""}
                        {d.connector ? (
                          <Link
                            to={`/connectors/${d.connector}?cavity=${encodeURIComponent(d.cavity!)}#pin-${d.cavity}`}
                            className="text-signal-dark underline"
                          >
                            {d.label}
                          </Link>
                        ) : (
                          d.label
                        )}
                      </span>
                    ))}
                  </p>
                ) : null}
              </li>
            ))}
          </ol>
          <div className="relative hidden overflow-x-auto md:block print:block">
            <table className="mt-2 w-full border-collapse bg-white text-left text-[0.95rem] print:mt-1 print:text-[7.5pt] print:leading-tight">
              <thead className="border-b-2 border-ink">
                <tr>
                  <th scope="col" className="p-1.5 print:px-1 print:py-0.5">
                    Cavity
                  </th>
                  <th scope="col" className="p-1.5 print:px-1 print:py-0.5">
                    Code as written
                  </th>
                  <th scope="col" className="p-1.5 print:px-1 print:py-0.5">
                    Colour
                  </th>
                  <th scope="col" className="p-1.5 print:px-1 print:py-0.5">
                    IEC 60757
                  </th>
                  <th scope="col" className="p-1.5 print:px-1 print:py-0.5">
                    Circuit
                  </th>
                  <th scope="col" className="p-1.5 print:px-1 print:py-0.5" title="DIN 72552 terminal designation">
                    Terminal
                  </th>
                  <th scope="col" className="p-1.5 print:px-1 print:py-0.5">
                    Goes to
                  </th>
                </tr>
              </thead>
              <tbody>
                {card.pins.map((p, i) => (
                  <tr
                    key={p.cavity}
                    id={`pin-${p.cavity}`}
                    data-cavity={p.cavity}
                    aria-current={highlight === p.cavity ? "true" : undefined}
                    className={`border-b border-rule align-top ${highlight === p.cavity ? "bg-caution outline-2 outline-caution-edge" : ""}`}
                  >
                    <th scope="row" className="p-1.5 font-bold print:px-1 print:py-0.5">
                      {p.cavity}
                      {p.cavity === card.layout.pin1 ? " ▼" : ""}
                    </th>
                    <td className="p-1.5 print:px-1 print:py-0.5">
                      <code className="font-semibold">{p.colour.code ?? "—"}</code>
                    </td>
                    <td className="p-1.5 print:px-1 print:py-0.5">
                      <ColourChip baseHex={card.paint[i]?.baseHex ?? null} tracerHexes={card.paint[i]?.tracerHexes ?? []} words={p.colour.description} />
                    </td>
                    <td className="p-1.5 print:px-1 print:py-0.5">
                      <code>{p.colour.iec ?? "—"}</code>
                    </td>
                    <td className="p-1.5 print:px-1 print:py-0.5">{p.circuit}</td>
                    <td className="p-1.5 print:px-1 print:py-0.5">{p.terminal ?? "—"}</td>
                    <td className="p-1.5 print:px-1 print:py-0.5">
                      {p.destinations.length === 0 ? (
                        "—"
                      ) : (
                        <ul className="print:inline">
                          {p.destinations.map((d, j) => (
                            <li key={j} className="print:inline">
                              {j > 0 ? <span className="hidden print:inline">; </span> : null}
                              {d.connector ? (
                                <Link
                                  to={`/connectors/${d.connector}?cavity=${encodeURIComponent(d.cavity!)}#pin-${d.cavity}`}
                                  className="text-signal-dark underline"
                                >
                                  {d.label}
                                </Link>
                              ) : (
                                d.label
                              )}
                            </li>
                          ))}
                        </ul>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p className="mt-1 text-xs text-muted">
            Codes in {card.colourSystem.toUpperCase()} notation, base colour first. The IEC 60757 column lists the colours in the standard&apos;s table order,
            not base first.
          </p>
        </section>
      </div>

      {card.specs.length > 0 ? <CardSpecs specs={card.specs} sharedConditions={sharedConditions} ownConditions={ownConditions} /> : null}

      {notesHtml ? (
        <section aria-labelledby="notes-heading" className="print-avoid-break">
          <h2 id="notes-heading" className="text-xl font-bold print:text-base">
            Notes
          </h2>
          <div className="prose max-w-3xl print:text-[8pt] print:leading-snug" dangerouslySetInnerHTML={{ __html: notesHtml }} />
        </section>
      ) : null}

      {card.photos.length ? <CardPhotos photos={card.photos} cardName={card.name} /> : null}

      <Cautions kinds={cautions} className="print:py-1 print:text-[7.5pt] print:leading-snug" />

      {card.revisions.length ? (
        <details className="no-print rounded-md border border-rule bg-white p-3" data-testid="revisions">
          <summary className="cursor-pointer font-semibold">Revision history ({card.revisions.length})</summary>
          <ol className="mt-2 space-y-1 text-sm">
            {card.revisions.map((r) => (
              <li key={r.number}>
                <span className="font-semibold">Revision {r.number}</span> · {r.publishedAt.slice(0, 10)} · {r.summary}
              </li>
            ))}
          </ol>
        </details>
      ) : null}

      <section aria-labelledby="yours" className="no-print rounded-md border border-rule bg-white p-4">
        <h2 id="yours" className="text-lg font-bold">
          On your bike
        </h2>
        {actionData?.done ? (
          <p role="status" className="mt-1 font-semibold">
            {actionData.done}
          </p>
        ) : null}
        {actionData?.errors.form ? (
          <p role="alert" className="mt-1 font-semibold text-signal-dark">
            {actionData.errors.form}
          </p>
        ) : null}
        {rider ? (
          <div className="mt-2 flex flex-wrap items-start gap-4">
            {can(rider.role, "garage.save") ? (
              <Form method="post">
                {rider.saved ? (
                  <span className="text-sm">★ In your garage</span>
                ) : (
                  <button name="intent" value="save" className="rounded border-2 border-ink px-3 py-1.5 font-semibold">
                    Save to my garage
                  </button>
                )}
              </Form>
            ) : null}
            {can(rider.role, "card.check") ? (
              <Form method="post" className="flex items-end gap-2">
                <label className="text-sm font-semibold">
                  Model year
                  <input
                    name="year"
                    inputMode="numeric"
                    defaultValue={rider.checkedYear ? String(rider.checkedYear) : ""}
                    className="mt-1 block w-20 rounded border-2 border-ink px-2 py-1 font-normal"
                  />
                </label>
                <button name="intent" value="check" className="rounded border-2 border-ink px-3 py-1.5 font-semibold">
                  {rider.checkedYear !== null ? "Update: matches my bike" : "It matches my bike"}
                </button>
              </Form>
            ) : null}
            {can(rider.role, "card.report") ? (
              <details className="w-full">
                <summary className="cursor-pointer font-semibold underline">Report a mistake</summary>
                <Form method="post" className="mt-2 space-y-2">
                  <label className="block text-sm font-semibold" htmlFor="report-text">
                    What is wrong (cavity, colour, what you found on your bike)
                  </label>
                  <textarea id="report-text" name="text" rows={3} maxLength={2000} className="block w-full max-w-xl rounded border-2 border-ink px-2 py-1" />
                  <button name="intent" value="report" className="rounded bg-ink px-3 py-1.5 font-semibold text-paper">
                    Send report
                  </button>
                </Form>
              </details>
            ) : null}
          </div>
        ) : (
          <p className="mt-1 text-sm">
            <Link to={`/login?next=${encodeURIComponent(`/connectors/${card.slug}`)}`} className="font-semibold underline">
              Sign in
            </Link>{" "}
            to save this card, confirm it matches your bike, or report a mistake.
          </p>
        )}
      </section>

      <footer className="no-print flex flex-wrap gap-3 text-sm">
        <a href={`/api/v1/connectors/${card.slug}?format=csv`} className="rounded border border-ink bg-white px-3 py-1.5 font-semibold no-underline">
          Download CSV
        </a>
        <a href={`/api/v1/connectors/${card.slug}`} className="rounded border border-ink bg-white px-3 py-1.5 font-semibold no-underline">
          JSON
        </a>
        {card.specs.length > 0 ? (
          <Link to={`/bench?connector=${card.slug}`} className="rounded border border-ink bg-white px-3 py-1.5 font-semibold no-underline">
            Bench sheet from these specs
          </Link>
        ) : null}
        {rider && can(rider.role, "submission.create") ? (
          <Link to={`/contribute?card=${card.slug}`} className="rounded border border-ink bg-white px-3 py-1.5 font-semibold no-underline">
            Propose a correction
          </Link>
        ) : null}
        <PrintButton />
      </footer>
    </article>
  );
}

/** Printing needs no JavaScript (the browser's own print works); the button is a convenience once hydrated. */
function PrintButton() {
  return (
    <button type="button" onClick={() => window.print()} className="rounded border border-ink bg-white px-3 py-1.5 font-semibold">
      Print this card
    </button>
  );
}
