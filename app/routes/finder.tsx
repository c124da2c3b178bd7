import { useEffect, useRef, useState } from "react";
import { Form, Link, useFetcher } from "react-router";
import type { Route } from "./+types/finder";
import { cautionsFor } from "~/domain/cautions";
import { Cautions } from "~/components/cautions";
import { ColourChip } from "~/components/colour-chip";
import { COLOUR_NAMES, swatch } from "~/domain/colours";
import { FADING_PAIRS } from "~/domain/colour-finder";
import { findByColours } from "~/services/finder.server";
import { listFamilies } from "~/services/library.server";
import { formFields, issueSentence } from "~/validation/forms";
import { finderBody, finderQuery } from "~/validation/workshop";
import { splitWires } from "~/domain/wire-list";

export const meta: Route.MetaFunction = () => [
  { title: "Colour finder: identify a cut-off plug · Loomlore" },
  { name: "description", content: "Enter the wire colours left on a cut-off plug and see which connectors in the library they most likely came from." },
];

type ReadAs = { system: string; houseStyle: string | null; words: string };
type Candidate = {
  connector: { slug: string; name: string; family: string; familyName?: string };
  score: number;
  matches: { wire: string; cavity: string | null; pinColour: string | null; quality: string; readAs?: ReadAs | null }[];
};

// The house where a notation has several (jis), else the notation: what the rider needs to see which reading was used.
const readAsLabel = (r: ReadAs) => `${r.houseStyle && r.system === "jis" ? r.houseStyle : r.system.toUpperCase()}: ${r.words}`;

const PICKABLE = COLOUR_NAMES.filter((c) => c !== "gold" && c !== "silver");
const SYSTEMS = ["ignition", "charging", "starting", "lighting", "signals", "instruments"] as const;

export async function loader({ request }: Route.LoaderArgs) {
  // The query string is read into the API's body and checked by the API's own schema (app/validation/workshop.ts).
  const query = finderQuery.parse(formFields(new URL(request.url).searchParams));
  const { families } = await listFamilies({ limit: 100, offset: 0 });
  const form = {
    wires: query.wires.join("\n"),
    pinCount: query.pinCount !== undefined ? String(query.pinCount) : "",
    gender: query.gender ?? "",
    family: query.family ?? "",
    familyMode: query.familyMode === "boost" ? "boost" : "filter",
    system: query.system ?? "",
  };
  if (!query.wires.length) return { form, families, candidates: null as Candidate[] | null, error: null as string | null, tookMs: null as number | null };
  const checked = finderBody.safeParse(query);
  if (!checked.success) return { form, families, candidates: null, error: issueSentence(checked.error.issues).message, tookMs: null };
  const { result, tookMs } = await findByColours(checked.data);
  if (!result.ok) return { form, families, candidates: null, error: result.error.message, tookMs };
  return { form, families, candidates: result.candidates as Candidate[], error: null, tookMs };
}

const QUALITY: Record<string, { words: string; mark: string }> = {
  exact: { words: "exact", mark: "●" },
  "tracer-missing": { words: "tracer missing", mark: "◐" },
  faded: { words: "faded colour", mark: "◑" },
  none: { words: "no match", mark: "○" },
};

export default function FinderPage({ loaderData }: Route.ComponentProps) {
  const { form, families } = loaderData;
  const [state, setState] = useState(form);
  const fetcher = useFetcher<{ candidates?: Candidate[]; error?: { message: string } }>();
  const timer = useRef<ReturnType<typeof setTimeout>>(undefined);
  useEffect(() => () => clearTimeout(timer.current), []);

  // With JavaScript: results follow the form as it is edited (debounced) through the JSON route.
  const update = (next: typeof form) => {
    setState(next);
    clearTimeout(timer.current);
    const wires = splitWires(next.wires);
    if (!wires.length) return;
    timer.current = setTimeout(() => {
      fetcher.submit(
        {
          wires,
          ...(next.pinCount ? { pinCount: Number(next.pinCount) } : {}),
          ...(next.gender ? { gender: next.gender } : {}),
          ...(next.system ? { system: next.system } : {}),
          ...(next.family ? { family: next.family, familyMode: next.familyMode } : {}),
        },
        { method: "post", action: "/api/v1/colour-finder", encType: "application/json" },
      );
    }, 200);
  };
  const edited = JSON.stringify(state) !== JSON.stringify(form);
  const live = edited && fetcher.data ? fetcher.data : null;
  const candidates = live ? (live.candidates ?? null) : loaderData.candidates;
  const error = live ? (live.error?.message ?? null) : loaderData.error;

  return (
    <div className="space-y-6">
      <header className="max-w-3xl">
        <h1 className="text-3xl font-bold">Colour finder</h1>
        <p className="mt-1 text-muted">
          The plug is gone and some wires are left? Enter the colours you can see — any notation, any order (<code>W/R</code>, <code>ws/rt</code>,{" "}
          <code>red/white</code>) — and the library&apos;s connectors are ranked by how well they explain them. Each connector reads your codes the way its own
          maker writes them where it can, and says beside each wire which reading it used.
        </p>
      </header>
      {/* Identifying a plug usually ends in cutting into the loom or probing it. */}
      <Cautions kinds={cautionsFor("finder")} className="max-w-3xl" />
      <div className="grid gap-6 lg:grid-cols-[380px_1fr]">
        <Form method="get" className="space-y-4 rounded-md border border-rule bg-white p-4" aria-label="Wires you can see">
          <label className="block text-sm font-semibold">
            Wire colours, one per line
            <textarea
              name="wires"
              rows={5}
              value={state.wires}
              onChange={(e) => update({ ...state, wires: e.target.value })}
              spellCheck={false}
              className="mt-1 block w-full rounded border-2 border-ink px-3 py-2 font-mono text-base"
              placeholder={"W/R\nB\nL/W"}
            />
          </label>
          <fieldset>
            <legend className="text-sm font-semibold">Or pick a base colour</legend>
            <div className="mt-1 flex flex-wrap gap-1">
              {PICKABLE.map((c) => (
                <button
                  key={c}
                  type="submit"
                  name="add"
                  value={c}
                  title={`Add a ${c} wire`}
                  onClick={(e) => {
                    e.preventDefault();
                    update({ ...state, wires: [...splitWires(state.wires), c].join("\n") });
                  }}
                  className="rounded border border-ink/40 bg-white px-1.5 py-1 text-xs hover:border-ink"
                >
                  <ColourChip baseHex={swatch(c).hex} tracerHexes={[]} words={c} />
                </button>
              ))}
            </div>
          </fieldset>
          <div className="grid grid-cols-2 gap-3">
            <label className="text-sm font-semibold">
              Cavities
              <input
                name="pinCount"
                inputMode="numeric"
                value={state.pinCount}
                onChange={(e) => update({ ...state, pinCount: e.target.value.replace(/\D/g, "") })}
                className="mt-1 block w-full rounded border-2 border-ink px-2 py-1 text-base font-normal"
                placeholder="any"
              />
            </label>
            <label className="text-sm font-semibold">
              Plug or socket
              <select
                name="gender"
                value={state.gender}
                onChange={(e) => update({ ...state, gender: e.target.value })}
                className="mt-1 block w-full rounded border-2 border-ink bg-white px-2 py-1 text-base font-normal"
              >
                <option value="">either</option>
                <option value="plug">plug</option>
                <option value="socket">socket</option>
              </select>
            </label>
          </div>
          <label className="block text-sm font-semibold">
            System
            <select
              name="system"
              value={state.system}
              onChange={(e) => update({ ...state, system: e.target.value })}
              className="mt-1 block w-full rounded border-2 border-ink bg-white px-2 py-1 text-base font-normal"
            >
              <option value="">any system</option>
              {SYSTEMS.map((s) => (
                <option key={s} value={s}>
                  {s}
                </option>
              ))}
            </select>
          </label>
          <label className="block text-sm font-semibold">
            Your bike&apos;s family
            <select
              name="family"
              value={state.family}
              onChange={(e) => update({ ...state, family: e.target.value })}
              className="mt-1 block w-full rounded border-2 border-ink bg-white px-2 py-1 text-base font-normal"
            >
              <option value="">any family</option>
              {families.map((f) => (
                <option key={f.slug} value={f.slug}>
                  {f.make.name} {f.name} ({f.yearFrom}–{f.yearTo})
                </option>
              ))}
            </select>
          </label>
          <fieldset className="text-sm">
            <legend className="font-semibold">Use the family to</legend>
            <label className="mr-4">
              <input
                type="radio"
                name="familyMode"
                value="filter"
                checked={state.familyMode === "filter"}
                onChange={() => update({ ...state, familyMode: "filter" })}
              />{" "}
              only search it
            </label>
            <label>
              <input
                type="radio"
                name="familyMode"
                value="boost"
                checked={state.familyMode === "boost"}
                onChange={() => update({ ...state, familyMode: "boost" })}
              />{" "}
              rank it first
            </label>
          </fieldset>
          <button type="submit" className="rounded bg-signal px-4 py-2 font-semibold text-white hover:bg-signal-dark">
            Find connectors
          </button>
          <p className="text-sm text-muted">
            Rule of thumb: faded insulation is matched using common workshop experience (
            {FADING_PAIRS.slice(0, 6)
              .map(([a, b]) => `${a}↔${b}`)
              .join(", ")}{" "}
            …); a missing tracer counts less against a match than a wrong base colour, and a wire the card has no place for counts most.
          </p>
        </Form>

        <section aria-live="polite" aria-labelledby="results" data-testid="finder-results">
          <h2 id="results" className="text-xl font-bold">
            {candidates ? `Most likely connectors${fetcher.state !== "idle" ? " (updating…)" : ""}` : "Results appear here"}
          </h2>
          {error ? (
            <p role="alert" className="mt-2 rounded border-l-4 border-signal bg-white px-3 py-2 font-semibold text-signal-dark">
              {error}
            </p>
          ) : null}
          {candidates && candidates.length === 0 ? <p className="mt-2">No connector in the library matches these filters.</p> : null}
          <ol className="mt-3 space-y-3">
            {(candidates ?? []).map((c, i) => (
              <li key={c.connector.slug} className="rounded-md border border-rule bg-white p-3">
                <p className="flex flex-wrap items-baseline justify-between gap-2">
                  <span>
                    <span className="mr-2 text-lg font-bold">{i + 1}.</span>
                    <Link to={`/connectors/${c.connector.slug}`} className="text-lg font-semibold text-signal-dark underline">
                      {c.connector.name}
                    </Link>
                    <span className="ml-2 text-sm text-muted">{c.connector.familyName ?? c.connector.family}</span>
                  </span>
                  <span className="font-semibold" title="1 − mean cost of the wire matches">
                    {Math.round(c.score * 100)} % match
                  </span>
                </p>
                <table className="mt-2 w-full text-left text-sm">
                  <thead>
                    <tr className="border-b border-rule">
                      <th className="py-1">Your wire</th>
                      <th>Read as</th>
                      <th>Cavity</th>
                      <th>Card says</th>
                      <th>Match</th>
                    </tr>
                  </thead>
                  <tbody>
                    {c.matches.map((m, j) => (
                      <tr key={j} className="border-b border-rule/60">
                        <td className="py-1">
                          <code className="font-semibold">{m.wire}</code>
                        </td>
                        <td className="text-xs text-muted">
                          {m.readAs ? <span data-read-as={m.readAs.houseStyle ?? m.readAs.system}>{readAsLabel(m.readAs)}</span> : "—"}
                        </td>
                        <td>
                          {m.cavity ? (
                            <Link to={`/connectors/${c.connector.slug}?cavity=${encodeURIComponent(m.cavity)}#pin-${m.cavity}`} className="underline">
                              cavity {m.cavity}
                            </Link>
                          ) : (
                            "—"
                          )}
                        </td>
                        <td>
                          <code>{m.pinColour ?? "—"}</code>
                        </td>
                        <td>
                          <span aria-hidden="true">{QUALITY[m.quality]?.mark} </span>
                          {QUALITY[m.quality]?.words ?? m.quality}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </li>
            ))}
          </ol>
        </section>
      </div>
    </div>
  );
}
