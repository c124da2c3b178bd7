import { Form, Link } from "react-router";
import type { Route } from "./+types/planner";
import { Cautions } from "~/components/cautions";
import { cautionsFor } from "~/domain/cautions";
import { ColourChip } from "~/components/colour-chip";
import { swatch } from "~/domain/colours";
import { listFamilies } from "~/services/library.server";
import { parsePlanQuery, planFor } from "~/services/planner.server";

export const meta: Route.MetaFunction = () => [
  { title: "Loom planner: cut list for a minimal loom · Loomlore" },
  { name: "description", content: "Keep the circuits you need and get a cut list with wire sizes from voltage drop and current, and the fuses." },
];

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const { query, errors } = parsePlanQuery(url);
  const { families } = await listFamilies({ limit: 100, offset: 0 });
  const planned = query.family ? await planFor(query) : null;
  return { families, query, errors, planned, search: url.search, unknownFamily: Boolean(query.family && !planned) };
}

const DECIDED: Record<string, string> = {
  "voltage-drop": "its circuit's voltage drop",
  ampacity: "current (5 A/mm² rule of thumb)",
  minimum: "mechanical minimum",
  fuse: "the fuse ahead of it",
  factory: "the factory's size",
};

export default function PlannerPage({ loaderData }: Route.ComponentProps) {
  const { families, query, errors, planned, search, unknownFamily } = loaderData;
  const plan = planned?.result && planned.result.ok ? planned.result.plan : null;
  const planError = planned?.result && !planned.result.ok ? planned.result.error.message : null;
  return (
    <div className="space-y-6">
      <header className="max-w-3xl">
        <h1 className="text-3xl font-bold">Loom planner</h1>
        <p className="mt-1 text-muted">
          Building a minimal loom? Keep the circuits you need, drop the rest, and get a cut list: every wire from → to, its colour, length, the current it
          carries in the bike&apos;s worst real state (charging at rpm with the lights on, cranking, the horn pressed), the smallest size that keeps each
          circuit&apos;s whole voltage drop within its target (3 % for ignition, charging and the headlamp, 10 % for the rest) and within the 5 A/mm² rule of
          thumb, the fuses — never raised above the factory&apos;s without checking what stands behind them — and the parts to buy.
        </p>
      </header>
      <Form method="get" className="no-print space-y-4 rounded-md border border-rule bg-white p-4" aria-label="What to keep">
        {/* Marks "the boxes below were shown for this family": a first visit, or a new family, keeps every circuit. */}
        {planned ? <input type="hidden" name="planned" value={planned.family.slug} /> : null}
        <div className="flex flex-wrap items-end gap-4">
          <label className="text-sm font-semibold">
            Family
            <select
              name="family"
              defaultValue={query.family}
              className="mt-1 block w-full max-w-[calc(100vw-4rem)] rounded border-2 border-ink bg-white px-2 py-1.5 text-base font-normal"
            >
              <option value="">choose…</option>
              {families.map((f) => (
                <option key={f.slug} value={f.slug}>
                  {f.make.name} {f.name} ({f.yearFrom}–{f.yearTo})
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm font-semibold">
            Colours
            <select name="scheme" defaultValue={query.scheme} className="mt-1 block rounded border-2 border-ink bg-white px-2 py-1.5 text-base font-normal">
              <option value="factory">the factory&apos;s</option>
              <option value="simple">a simpler scheme</option>
            </select>
          </label>
          <label className="text-sm font-semibold">
            Wire temperature
            <select
              name="tempC"
              defaultValue={String(query.tempC)}
              className="mt-1 block rounded border-2 border-ink bg-white px-2 py-1.5 text-base font-normal"
            >
              {[20, 40, 60, 80].map((t) => (
                <option key={t} value={t}>
                  {t} °C{t === 20 ? " (standard)" : ""}
                </option>
              ))}
            </select>
          </label>
        </div>
        {planned ? (
          <fieldset>
            <legend className="text-sm font-semibold">Circuits to keep</legend>
            <div className="mt-1 grid gap-1 sm:grid-cols-2 lg:grid-cols-3">
              {planned.circuits.map((c) => (
                <label key={c.slug} className="flex items-start gap-2 text-sm">
                  <input type="checkbox" name="keep" value={c.slug} defaultChecked={planned.keep.includes(c.slug)} className="mt-1" />
                  <span className="font-semibold">{c.name}</span>
                </label>
              ))}
            </div>
          </fieldset>
        ) : null}
        {plan ? Object.entries(query.lengthsM).map(([k, v]) => <input key={k} type="hidden" name={`len_${k}`} value={v} />) : null}
        <button type="submit" className="rounded bg-signal px-4 py-2 font-semibold text-white hover:bg-signal-dark">
          {planned ? "Plan the loom" : "Show its circuits"}
        </button>
      </Form>
      {unknownFamily ? (
        <p role="alert" className="font-semibold text-signal-dark">
          There is no family “{query.family}” in the library.
        </p>
      ) : null}
      {planned && !planned.keep.length ? (
        <p role="status" className="font-semibold">
          Tick at least one circuit to keep.
        </p>
      ) : null}
      {planError ? (
        <p role="alert" className="font-semibold text-signal-dark">
          {planError}
        </p>
      ) : null}
      {planned?.yearError ? (
        <p role="alert" className="font-semibold text-signal-dark">
          {planned.yearError}
        </p>
      ) : null}
      <Cautions kinds={cautionsFor("planner")} />

      {plan && planned ? (
        <Form method="get" aria-label="Cut list">
          {[
            ["family", query.family],
            ["planned", query.family],
            ["scheme", query.scheme],
            ["tempC", String(query.tempC)],
            ...planned.keep.map((k) => ["keep", k]),
          ].map(([k, v], i) => (
            <input key={i} type="hidden" name={k} value={v} />
          ))}
          <section aria-labelledby="cut" className="space-y-2">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h2 id="cut" className="text-2xl font-bold">
                Cut list: {planned.family.name}
              </h2>
              <span className="no-print flex gap-2 text-sm">
                <a href={`/planner/cut-list.csv${search}`} className="rounded border border-ink bg-white px-3 py-1.5 font-semibold no-underline">
                  Download CSV
                </a>
              </span>
            </div>
            <p className="text-sm">
              {plan.totals.wires} wires, {plan.totals.lengthM.toFixed(1)} m in all:{" "}
              {Object.entries(plan.totals.byGauge)
                .sort(([a], [b]) => Number(a) - Number(b))
                .map(([g, m]) => `${g} mm² × ${m.toFixed(1)} m`)
                .join(" · ")}
              .
            </p>
            <p className="text-sm text-muted">
              Lengths: type your own run lengths (metres) where you know them; empty boxes use the family&apos;s default shown in grey.
            </p>
            <div className="relative overflow-x-auto">
              <table className="w-full min-w-[980px] border-collapse bg-white text-left text-[0.92rem] print:min-w-0 print:text-[8pt]">
                <thead className="border-b-2 border-ink">
                  <tr>
                    <th className="p-1.5">From</th>
                    <th className="p-1.5">To</th>
                    <th className="p-1.5">Colour</th>
                    <th className="p-1.5">Length (m)</th>
                    <th className="p-1.5">Current</th>
                    <th className="p-1.5">Size</th>
                    <th className="p-1.5">Drop</th>
                    <th className="p-1.5">Why this size</th>
                  </tr>
                </thead>
                <tbody>
                  {plan.rows.map((r) => (
                    <tr key={r.wire} className="border-b border-rule align-top" data-wire={r.wire}>
                      <td className="p-1.5">{r.from}</td>
                      <td className="p-1.5">{r.to}</td>
                      <td className="p-1.5 whitespace-nowrap">
                        <ColourChip
                          baseHex={r.colours[0] ? swatch(r.colours[0]).hex : null}
                          tracerHexes={r.colours.slice(1).map((c) => swatch(c).hex)}
                          code={r.colour}
                        />
                      </td>
                      <td className="p-1.5">
                        <input
                          name={`len_${r.wire}`}
                          aria-label={`Length of ${r.from} to ${r.to}, metres`}
                          defaultValue={query.lengthsM[r.wire] ?? ""}
                          placeholder={String(r.lengthM)}
                          inputMode="decimal"
                          aria-invalid={errors[`len_${r.wire}`] ? true : undefined}
                          className="w-16 rounded border-2 border-ink/70 px-1 py-0.5 print:border-0"
                        />
                        <span className="block text-xs text-muted">{r.lengthSource}</span>
                        {errors[`len_${r.wire}`] ? <span className="block text-xs font-semibold text-signal-dark">{errors[`len_${r.wire}`]}</span> : null}
                      </td>
                      <td className="p-1.5 whitespace-nowrap">
                        {r.currentA.toFixed(2)} A
                        <span className="block text-xs text-muted">
                          {r.role === "signal"
                            ? "signal"
                            : r.role === "earth"
                              ? "earth"
                              : r.momentary
                                ? "while held"
                                : r.peakA > r.currentA + 0.05
                                  ? `peak ${r.peakA.toFixed(1)} A`
                                  : ""}
                        </span>
                      </td>
                      <td className="p-1.5 font-semibold whitespace-nowrap">
                        {r.sizeMm2} mm²{r.awg !== null ? <span className="block text-xs font-normal text-muted">≈ {r.awg} AWG</span> : null}
                      </td>
                      <td className="p-1.5 whitespace-nowrap">{r.dropV.toFixed(3)} V</td>
                      <td className="p-1.5 text-sm">
                        {DECIDED[r.decidedBy]}
                        {r.notes.length ? <span className="block text-xs text-muted">{r.notes.join(" ")}</span> : null}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <button type="submit" className="no-print rounded border-2 border-ink bg-white px-4 py-1.5 font-semibold">
              Recalculate with these lengths
            </button>
          </section>
          {plan.warnings.length ? (
            <section aria-labelledby="warn" className="mt-6 rounded-md border-l-4 border-signal bg-white p-3">
              <h2 id="warn" className="text-xl font-bold">
                Check before you cut
              </h2>
              <ul className="mt-1 list-disc pl-6">
                {plan.warnings.map((w, i) => (
                  <li key={i}>{w}</li>
                ))}
              </ul>
            </section>
          ) : null}
          <section aria-labelledby="drops" className="mt-6">
            <h2 id="drops" className="text-xl font-bold">
              Each circuit&apos;s drop
            </h2>
            <table className="mt-2 border-collapse bg-white text-left text-sm">
              <thead className="border-b-2 border-ink">
                <tr>
                  <th className="p-1.5">Circuit</th>
                  <th className="p-1.5">Wires drop</th>
                  <th className="p-1.5">Target</th>
                </tr>
              </thead>
              <tbody>
                {plan.circuitDrops.map((d) => (
                  <tr key={d.circuit} className="border-b border-rule">
                    <td className="p-1.5">{d.name}</td>
                    <td className="p-1.5">{d.dropV.toFixed(3)} V</td>
                    <td className="p-1.5">
                      ≤ {d.budgetV} V ({d.budgetPct} %)
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
          <section aria-labelledby="fuses" className="mt-6">
            <h2 id="fuses" className="text-xl font-bold">
              Fuses
            </h2>
            {plan.fuses.length ? (
              <ul className="mt-2 space-y-2">
                {plan.fuses.map((f) => (
                  <li key={f.id}>
                    <strong>{f.ratingA} A</strong> &quot;{f.name}&quot; (factory {f.factoryA} A{f.raised ? ", raised" : ""}) for {f.circuits.join(", ")} —{" "}
                    <span className="text-sm text-muted">{f.basis}</span>
                    {f.warnings.length ? (
                      <ul className="list-disc pl-6 text-sm">
                        {f.warnings.map((w, i) => (
                          <li key={i}>{w}</li>
                        ))}
                      </ul>
                    ) : null}
                  </li>
                ))}
              </ul>
            ) : (
              <p className="mt-1">None of the kept circuits has a factory fuse.</p>
            )}
          </section>
          <section aria-labelledby="legend" className="mt-6">
            <h2 id="legend" className="text-xl font-bold">
              Colour legend
            </h2>
            <ul className="mt-2 space-y-1 text-sm">
              {plan.legend.map((l) => (
                <li key={l.colour} className="flex items-start gap-2">
                  <ColourChip
                    baseHex={l.colours[0] ? swatch(l.colours[0]).hex : null}
                    tracerHexes={l.colours.slice(1).map((c) => swatch(c).hex)}
                    code={l.colour}
                  />{" "}
                  <span>{l.meaning}</span>
                </li>
              ))}
            </ul>
          </section>
          <section aria-labelledby="parts" className="mt-6">
            <h2 id="parts" className="text-xl font-bold">
              Parts to buy
            </h2>
            <table className="mt-2 border-collapse bg-white text-left text-sm">
              <thead className="border-b-2 border-ink">
                <tr>
                  <th className="p-1.5">Item</th>
                  <th className="p-1.5">Quantity</th>
                  <th className="p-1.5">Note</th>
                </tr>
              </thead>
              <tbody>
                {plan.parts.map((p, i) => (
                  <tr key={i} className="border-b border-rule">
                    <td className="p-1.5">{p.item}</td>
                    <td className="p-1.5 whitespace-nowrap">
                      {p.quantity} {p.unit}
                    </td>
                    <td className="p-1.5 text-muted">{p.notes}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
          <section aria-labelledby="assume" className="mt-6 text-sm">
            <h2 id="assume" className="text-lg font-bold">
              Assumptions and rules of thumb
            </h2>
            <ul className="mt-1 list-disc pl-6">
              {plan.assumptions.map((a, i) => (
                <li key={i}>{a}</li>
              ))}
            </ul>
            <p className="mt-2">
              Wire gauges are AWG (ASTM B258), not SAE: SAE J1128 cable of the same number has less copper — check the cross-section on the reel. Dropped:{" "}
              {plan.dropped.length ? plan.dropped.map((d) => d.name).join(", ") : "nothing"}.
            </p>
            <p className="mt-2">
              See a wire on its card:{" "}
              <Link to={`/families/${planned.family.slug}`} className="underline">
                {planned.family.name} connectors
              </Link>
              .
            </p>
          </section>
        </Form>
      ) : null}
    </div>
  );
}
