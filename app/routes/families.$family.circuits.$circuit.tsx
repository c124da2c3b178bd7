import { useEffect, useRef } from "react";
import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/families.$family.circuits.$circuit";
import { Cautions } from "~/components/cautions";
import { cautionsFor } from "~/domain/cautions";
import { CircuitDrawing } from "~/components/circuit-drawing";
import { decodeColour, houseFor, swatch, type ColourSystemId } from "~/domain/colours";
import { SWITCH_POSITIONS, type SwitchId } from "~/domain/loom-graph";
import { diagnoseFor, walkFor } from "~/services/circuits.server";

export const meta: Route.MetaFunction = ({ loaderData }) => [
  { title: loaderData ? `${loaderData.circuit.name} · ${loaderData.family.name} · Loomlore` : "Not found · Loomlore" },
];

const SWITCH_NAMES: Record<SwitchId, string> = {
  main: "Main switch",
  kill: "Kill switch",
  start: "Start button",
  lights: "Lights",
  brake: "Brake",
  beam: "Beam",
  indicators: "Indicators",
  horn: "Horn button",
  gear: "Gearbox",
  engine: "Engine",
  points: "Points",
};

/** Switches the rider sets on the page; the engine and the points have their own controls. */
const PAGE_SWITCHES = (Object.keys(SWITCH_POSITIONS) as SwitchId[]).filter((id) => id !== "engine" && id !== "points");

/** The switch positions chosen in the form or query; the rest take the circuit's working positions. */
function switchesFrom(params: URLSearchParams | FormData) {
  const out: Record<string, string> = {};
  for (const id of PAGE_SWITCHES) {
    const v = params.get(id);
    if (typeof v === "string" && v) out[id] = v;
  }
  return out;
}

const stateFrom = (params: URLSearchParams | FormData) => {
  const e = params.get("engine");
  const p = params.get("points");
  return { engine: typeof e === "string" ? e : null, points: typeof p === "string" ? p : null };
};

export async function loader({ params, request }: Route.LoaderArgs) {
  const q = new URL(request.url).searchParams;
  const w = await walkFor(params.family, params.circuit, switchesFrom(q), "working", stateFrom(q));
  if (!w.ok) throw data(w.error.message, { status: w.error.status });
  const notation = w.family.colourSystem as ColourSystemId;
  const paint = w.walk.probePoints.map((p) => {
    const d = p.colour ? decodeColour(p.colour, notation, { houseStyle: houseFor(notation, w.family.make?.houseStyle) }) : null;
    const cols = d?.ok ? d.value.colours : [];
    return { baseHex: cols[0] ? swatch(cols[0]).hex : null, tracerHex: cols[1] ? swatch(cols[1]).hex : null };
  });
  return {
    walk: w.walk,
    circuit: w.circuit,
    family: { slug: w.family.slug, name: w.family.name, earth: w.family.earth, systemVoltage: w.family.systemVoltage },
    paint,
    state: w.state,
    hasPoints: w.hasPoints,
    hasStarter: w.hasStarter,
  };
}

/** Diagnose from the readings typed into the form (fields r1, r2 …); bad numbers come back beside their field, nothing lost. */
export async function action({ params, request }: Route.ActionArgs) {
  const form = await request.formData();
  const values: Record<string, string> = {};
  const errors: Record<string, string> = {};
  const readings: { step: number; value: number }[] = [];
  for (const [key, entry] of form) {
    const m = /^r(\d{1,3})$/.exec(key);
    if (!m || typeof entry !== "string") continue;
    const step = Number(m[1]);
    const raw = entry.trim().replace(",", ".");
    values[step] = raw;
    if (!raw) continue;
    const value = /^(ol|open)$/i.test(raw) ? Number.POSITIVE_INFINITY : Number(raw.replace(/^−/, "-"));
    if (!Number.isFinite(value) && value !== Number.POSITIVE_INFINITY) errors[step] = "Enter a number (e.g. 12.4), or OL for an open circuit.";
    else readings.push({ step, value });
  }
  if (Object.keys(errors).length) return data({ values, errors, diagnosis: null }, { status: 400 });
  const d = await diagnoseFor(params.family, params.circuit, switchesFrom(form), readings, "working", stateFrom(form));
  if (!d.ok) return data({ values, errors: { form: d.error.message } as Record<string, string>, diagnosis: null }, { status: d.error.status });
  return { values, errors, diagnosis: d.diagnosis };
}

const fmtV = (v: number) => String(v).replace(/^-/, "−");
const expectWords = (
  e: { quantity: string; min: number | null; max: number | null; unit: string; steady?: boolean; nominal?: number | null },
  systemV: number,
) => {
  if (e.quantity !== "voltage")
    return e.quantity === "continuity" ? (e.max === 0 ? "reference (0 Ω)" : `continuity (≤ ${e.max ?? "a few"} Ω)`) : `${e.min}–${e.max} ${e.unit}`;
  if (e.steady === false || e.min === null || e.max === null) return "no steady reading (switching)";
  const range = `${fmtV(e.min)} to ${fmtV(e.max)} V`;
  if (Math.max(Math.abs(e.min), Math.abs(e.max)) <= 0.8) return `near 0 V (${range})`;
  if (Math.abs(e.nominal ?? 0) >= 0.8 * systemV) return `battery voltage (${range})`;
  return range;
};

const KIND_WORDS = { open: "an open circuit", high_resistance: "a high resistance", short: "a short" } as const;
const ENGINE_WORDS = { stopped: "stopped", cranking: "cranking (start button held)", running: "running (charging at rpm)" } as const;

export default function CircuitWalkPage({ loaderData, actionData }: Route.ComponentProps) {
  const { walk, circuit, family, paint, state, hasPoints, hasStarter } = loaderData;
  const nav = useNavigation();
  // After "Where is the fault?" the answer is where the rider is looking: focus moves to it (and it is announced).
  const verdictRef = useRef<HTMLElement>(null);
  useEffect(() => {
    if (actionData && verdictRef.current) {
      verdictRef.current.focus({ preventScroll: true });
      verdictRef.current.scrollIntoView({ block: "start", behavior: "smooth" });
    }
  }, [actionData]);
  const diagnosis = actionData?.diagnosis ?? null;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  const highlight = diagnosis?.fault ? diagnosis.fault.between : diagnosis?.next ? [diagnosis.next] : [];
  const powered = walk.circuit.powered;
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="no-print text-sm">
        <Link to="/" className="underline">
          Library
        </Link>{" "}
        ›{" "}
        <Link to={`/families/${family.slug}`} className="underline">
          {family.name}
        </Link>{" "}
        ›{" "}
        <Link to={`/families/${family.slug}/circuits`} className="underline">
          Circuits
        </Link>{" "}
        › {circuit.name}
      </nav>
      <header>
        <h1 className="text-3xl font-bold">{circuit.name}</h1>
        <p className="mt-1 max-w-3xl text-muted">
          {powered
            ? `Meter on DC volts, ${walk.reference?.words ?? "black lead on the battery's earth post"}. Connect it with the ignition off, then switch on. Work along the probe points in order; compare each with the one before: under load a good contact loses no more than about 0.2 V.`
            : "Ignition off, battery earth lead off, the loop's connectors unplugged. Ohmmeter: one lead stays on step 1, the other goes to each point in turn."}
        </p>
        {powered ? (
          <p className="mt-1 text-sm font-semibold" data-testid="state">
            Engine {ENGINE_WORDS[state.engine as keyof typeof ENGINE_WORDS]}
            {hasPoints ? `, points ${state.points}` : ""}
            {family.earth === "positive" ? " · positive earth: live points read negative" : ""}
            {family.systemVoltage === 6 ? " · 6 V system" : ""}
          </p>
        ) : null}
      </header>

      {/* The one caution set (app/domain/cautions.ts): a continuity walk is done stopped, a voltage walk in the state asked for. */}
      <Cautions kinds={cautionsFor("walk", powered ? state.engine : "stopped")} />

      {powered ? (
        <Form method="get" className="no-print flex flex-wrap items-end gap-3 rounded-md border border-rule bg-white p-3" aria-label="Switch positions">
          <label className="flex flex-col text-sm font-semibold">
            Engine
            <select name="engine" defaultValue={state.engine} className="mt-1 rounded border-2 border-ink bg-white px-2 py-1 text-base font-normal">
              {(["stopped", ...(hasStarter ? ["cranking"] : []), "running"] as const).map((e) => (
                <option key={e} value={e}>
                  {e}
                </option>
              ))}
            </select>
          </label>
          {hasPoints ? (
            <label className="flex flex-col text-sm font-semibold">
              Points (engine stopped)
              <select
                name="points"
                defaultValue={state.points ?? "closed"}
                className="mt-1 rounded border-2 border-ink bg-white px-2 py-1 text-base font-normal"
              >
                <option value="closed">closed</option>
                <option value="open">open</option>
              </select>
            </label>
          ) : null}
          {PAGE_SWITCHES.map((id) => (
            <label key={id} className="flex flex-col text-sm font-semibold">
              {SWITCH_NAMES[id]}
              <select name={id} defaultValue={walk.switches[id]} className="mt-1 rounded border-2 border-ink bg-white px-2 py-1 text-base font-normal">
                {SWITCH_POSITIONS[id].map((pos) => (
                  <option key={pos} value={pos}>
                    {pos}
                  </option>
                ))}
              </select>
            </label>
          ))}
          <button type="submit" className="rounded bg-ink px-4 py-2 font-semibold text-paper">
            Show readings for these positions
          </button>
        </Form>
      ) : null}

      {walk.notes.length ? (
        <section aria-labelledby="assume" className="max-w-3xl text-sm">
          <h2 id="assume" className="font-bold">
            What this walk assumes
          </h2>
          <ul className="list-disc pl-6">
            {walk.notes.map((n, i) => (
              <li key={i}>{n}</li>
            ))}
          </ul>
        </section>
      ) : null}

      <section aria-labelledby="drawing" className="rounded-md border border-rule bg-white p-2">
        <h2 id="drawing" className="sr-only">
          Drawing
        </h2>
        <CircuitDrawing
          powered={powered}
          loads={walk.loadNames}
          highlight={highlight}
          points={walk.probePoints.map((p, i) => ({
            step: p.step,
            label: p.label,
            side: p.side,
            code: p.colour,
            ...paint[i],
            expectWords: expectWords(p.expect, family.systemVoltage),
            after: p.after,
            before: p.before,
          }))}
        />
        <p className="px-2 text-sm text-muted">
          {powered
            ? "Top: the supply side, battery + outwards (points fed in parallel sit side by side). Bottom: the return, back to the battery − post on the left."
            : "Top: from step 1 to the load. Bottom: from the load back."}
        </p>
        <p className="px-2 pb-1 text-sm">
          <span className="font-semibold">{walk.loadNames.length > 1 ? "Loads" : "Load"}:</span> {walk.loadNames.join(" · ")}
        </p>
      </section>

      {diagnosis ? (
        <section
          ref={verdictRef}
          tabIndex={-1}
          role="status"
          aria-live="polite"
          aria-labelledby="verdict"
          className={`scroll-mt-4 rounded-md border-l-4 p-4 outline-none focus:ring-2 focus:ring-ink ${diagnosis.fault ? "border-signal bg-white" : "border-ink bg-white"}`}
          data-testid="diagnosis"
        >
          <h2 id="verdict" className="text-xl font-bold">
            {diagnosis.fault
              ? `${KIND_WORDS[diagnosis.fault.kind].replace(/^./, (c) => c.toUpperCase())} between step ${diagnosis.fault.between[0]} and step ${diagnosis.fault.between[1]}`
              : "No fault located yet"}
          </h2>
          {diagnosis.battery && diagnosis.battery.verdict !== "ok" ? <p className="mt-1 font-semibold">{diagnosis.battery.message}</p> : null}
          {diagnosis.notes.length ? (
            <ul className="mt-1 text-sm text-muted">
              {diagnosis.notes.map((n, i) => (
                <li key={i}>{n}</li>
              ))}
            </ul>
          ) : null}
          {diagnosis.fault ? (
            <>
              <p className="mt-1">{diagnosis.fault.reason}</p>
              <p className="mt-2 font-semibold">Look at:</p>
              <ul className="list-disc pl-6">
                {diagnosis.fault.likely.map((l, i) => (
                  <li key={i}>{l}</li>
                ))}
              </ul>
            </>
          ) : (
            <p className="mt-1">Every reading you entered is as expected.</p>
          )}
          {diagnosis.next ? (
            <p className="mt-2">
              <strong>Measure step {diagnosis.next} next</strong> — it halves what is left to search.
            </p>
          ) : null}
        </section>
      ) : null}

      <Form method="post" className="space-y-3" aria-label="Your readings">
        {Object.entries(walk.switches).map(([k, v]) => (
          <input key={k} type="hidden" name={k} value={v} />
        ))}
        {errors.form ? (
          <p role="alert" className="font-semibold text-signal-dark">
            {errors.form}
          </p>
        ) : null}
        <div className="relative overflow-x-auto">
          <table className="w-full border-collapse bg-white text-left text-[0.95rem]">
            <thead className="border-b-2 border-ink">
              <tr>
                <th className="p-2">Step</th>
                <th className="p-2">Where</th>
                <th className="p-2">Wire</th>
                <th className="p-2">Expect</th>
                <th className="p-2">How</th>
                <th className="no-print p-2">Your reading</th>
              </tr>
            </thead>
            <tbody>
              {walk.probePoints.map((p) => (
                <tr key={p.step} data-step={p.step} className={`border-b border-rule align-top ${highlight.includes(p.step) ? "bg-caution" : ""}`}>
                  <th scope="row" className="p-2 text-lg">
                    {p.step}
                  </th>
                  <td className="p-2">
                    {p.connector ? (
                      <Link to={`/connectors/${p.connector}?cavity=${encodeURIComponent(p.cavity)}#pin-${p.cavity}`} className="text-signal-dark underline">
                        {p.label}
                      </Link>
                    ) : (
                      p.label
                    )}
                  </td>
                  <td className="p-2">
                    <code className="font-semibold">{p.colour ?? "—"}</code>
                  </td>
                  <td className="p-2 whitespace-nowrap">{expectWords(p.expect, family.systemVoltage)}</td>
                  <td className="p-2 text-sm">{p.how}</td>
                  <td className="no-print p-2">
                    <label className="sr-only" htmlFor={`r${p.step}`}>
                      Reading at step {p.step} ({p.expect.unit})
                    </label>
                    <span className="flex items-center gap-1">
                      <input
                        id={`r${p.step}`}
                        name={`r${p.step}`}
                        inputMode="decimal"
                        defaultValue={values[p.step] ?? ""}
                        aria-invalid={errors[p.step] ? true : undefined}
                        aria-describedby={errors[p.step] ? `e${p.step}` : undefined}
                        className="w-24 rounded border-2 border-ink px-2 py-1"
                      />
                      <span className="text-sm">{p.expect.unit}</span>
                    </span>
                    {errors[p.step] ? (
                      <span id={`e${p.step}`} className="mt-1 block text-sm font-semibold text-signal-dark">
                        {errors[p.step]}
                      </span>
                    ) : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <button
          type="submit"
          className="no-print rounded bg-signal px-5 py-2 text-lg font-semibold text-white hover:bg-signal-dark"
          disabled={nav.state === "submitting"}
        >
          {nav.state === "submitting" ? "Working it out…" : "Where is the fault?"}
        </button>
        <p className="text-sm text-muted">
          How this works: the expected readings come from the loom itself — which contacts are closed in this state, which loads draw current, and how much each
          wire and terminal drops. With current flowing, a poor contact shows as a drop between two points: more than about 0.2 V per contact, or 0.5 V over a
          whole supply or earth side, is a high resistance there (common practice). An open takes the whole voltage: the points after it on the supply side read
          0 V, or the return side floats up to battery voltage. A point that reads battery voltage where nothing should feed it, or 0 V where only the load
          feeds it, points to a short.
        </p>
        <p className="text-sm text-muted">
          Battery windows: about 12.6 V at rest fully charged, at least 9.6 V while cranking, 13.5–14.5 V charging at rpm (common practice; a card&apos;s own
          regulated-voltage spec takes precedence); a 6 V bike is half. Resistances are the card&apos;s own spec values plus up to 1 Ω for the loom&apos;s wires
          and terminals.
        </p>
      </Form>
    </div>
  );
}
