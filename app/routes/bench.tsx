import { Form, Link } from "react-router";
import type { Route } from "./+types/bench";
import { Cautions } from "~/components/cautions";
import { OVER_LIMIT, benchReading, resistanceUnit, type BenchResult } from "~/domain/bench";
import { cautionsFor } from "~/domain/cautions";
import { SPEC_KIND_LABELS, SPEC_MATERIALS, isSpecKind, isSpecMaterial, specKindOf, type SpecMaterial } from "~/domain/specs";
import { getConnectorCard } from "~/services/library.server";

export const meta: Route.MetaFunction = () => [
  { title: "Bench sheet: resistances against spec · Loomlore" },
  { name: "description", content: "Check measured resistances of pickups, coils, caps and wire runs against their ranges, corrected to 20 °C." },
];

interface Row {
  name: string;
  min: string;
  max: string;
  unit: string;
  measured: string;
  tempC: string;
  material: "" | SpecMaterial;
  /** How the value can be measured, as the card states it; carried in the address, shown under the name. */
  conditions: string;
  /** The card's spec kind, when it is not a plain resistance (e.g. "insulation", "regulated-voltage"). */
  kind: string;
}
const FIELDS = ["name", "min", "max", "unit", "measured", "tempC", "material", "conditions", "kind"] as const;
const KEY: Record<(typeof FIELDS)[number], string> = {
  name: "n",
  min: "lo",
  max: "hi",
  unit: "u",
  measured: "m",
  tempC: "t",
  material: "mt",
  conditions: "c",
  kind: "k",
};
const MAX_ROWS = 40;
const UNITS = ["mΩ", "Ω", "kΩ", "MΩ"];

const num = (s: string) => (s.trim() === "" ? null : Number(s.trim().replace(",", ".")));
// A spec with no upper limit is written "open" in the maximum box; a meter's over-limit reading "OL".
const OPEN_MAX = /^(?:open|none|∞|-|—)$/i;
const OPEN_READING = /^(?:ol|o\.l\.|open|∞)$/i;
const ENGINE_KINDS = new Set(["regulated-voltage", "ac-output", "dwell"]);

function rowFrom(q: URLSearchParams, i: number): Row | null {
  const get = (f: (typeof FIELDS)[number]) => q.get(`${KEY[f]}${i}`) ?? "";
  const row: Row = {
    name: get("name"),
    min: get("min"),
    max: get("max"),
    unit: get("unit"),
    measured: get("measured"),
    tempC: get("tempC"),
    material: isSpecMaterial(get("material")) ? (get("material") as SpecMaterial) : "",
    conditions: get("conditions").slice(0, 400),
    kind: isSpecKind(get("kind")) ? get("kind") : "",
  };
  // Sheets bookmarked before materials had their own select said copper yes/no.
  const cu = q.get(`cu${i}`);
  if (!row.material && cu === "yes") row.material = "copper";
  if (!row.material && cu === "no") row.material = "other";
  row.unit = resistanceUnit(row.unit) ?? row.unit;
  return FIELDS.some((f) => row[f] !== "") || cu ? row : null;
}

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const q = url.searchParams;
  let rows: Row[] = [];
  for (let i = 0; i < MAX_ROWS; i++) {
    const row = rowFrom(q, i);
    if (row) rows.push(row);
  }
  // Start a sheet from a connector card's spec values, with each spec's material, conditions and open maximum.
  const slug = q.get("connector");
  let source: { slug: string; name: string } | null = null;
  if (slug && rows.length === 0) {
    const card = await getConnectorCard(slug);
    if (card) {
      source = { slug, name: `${card.connector.family.name}: ${card.connector.name}` };
      rows = card.connector.specs.map((s) => ({
        name: `${s.name}, between cavities ${s.between[0]} and ${s.between[1]}`,
        min: String(s.min),
        max: s.max === null ? "open" : String(s.max),
        unit: resistanceUnit(s.unit) ?? s.unit,
        measured: "",
        tempC: "",
        material: isSpecMaterial(s.material) ? s.material : "",
        conditions: s.conditions ?? "",
        kind: specKindOf(s.kind) === "resistance" ? "" : specKindOf(s.kind),
      }));
    }
  }
  // Two spare rows for a new sheet; "Add rows" asks for more. Checking a sheet never grows it by itself.
  const blanks = Math.max(0, Math.min(MAX_ROWS, Number(q.get("rows")) || rows.length + 2) - rows.length);
  const results: (BenchResult | { error: string; field: string } | null)[] = rows.map((r, i) => {
    if (r.measured.trim() === "") return null;
    const at = `row ${i + 1}`;
    if (r.max.trim() === "") return { error: `${at}: give the maximum, or write “open” when the spec has no upper limit.`, field: `${at}.max` };
    try {
      return benchReading(
        {
          name: r.name || `Reading ${i + 1}`,
          min: num(r.min) ?? NaN,
          max: OPEN_MAX.test(r.max.trim()) ? null : (num(r.max) ?? NaN),
          unit: r.unit || "Ω",
          measured: OPEN_READING.test(r.measured.trim()) ? OVER_LIMIT : (num(r.measured) ?? NaN),
          tempC: num(r.tempC),
          material: r.material || null,
        },
        at,
      );
    } catch (e) {
      if (e instanceof RangeError) return { error: e.message, field: (e as RangeError & { field?: string }).field ?? "" };
      throw e;
    }
  });
  // A sheet that includes a running-engine value (charging output, regulated voltage, dwell) gets the running cautions.
  const engine = rows.some((r) => ENGINE_KINDS.has(r.kind)) ? "running" : "stopped";
  const blank: Row = { name: "", min: "", max: "", unit: "Ω", measured: "", tempC: "", material: "", conditions: "", kind: "" };
  return {
    rows: [...rows, ...Array.from({ length: blanks }, () => ({ ...blank }))],
    results,
    source,
    link: url.search,
    cautions: cautionsFor("bench", engine),
  };
}

const VERDICT = { in_range: "in range", low: "LOW", high: "HIGH" } as const;
const MATERIAL_WORDS: Record<SpecMaterial, string> = { copper: "copper", carbon: "carbon", other: "other" };

const shownValue = (r: BenchResult) => (r.at20C === OVER_LIMIT ? OVER_LIMIT : `${Number(r.at20C.toPrecision(4))} ${r.unit}`);

export default function BenchPage({ loaderData }: Route.ComponentProps) {
  const { rows, results, source, link, cautions } = loaderData;
  const input = "rounded border-2 border-ink/70 px-2 py-1 print:border-0 print:p-0";
  const select = "rounded border-2 border-ink/70 bg-white px-1 py-1";
  return (
    <div className="space-y-5">
      <header className="max-w-3xl">
        <h1 className="text-3xl font-bold">Bench sheet</h1>
        <p className="mt-1 text-muted">
          Enter what your meter reads and the part&apos;s temperature. Copper windings (pickups, coil primaries and secondaries, stators, field windings, a
          length of wire) read higher when warm, so their readings are corrected to 20 °C — the temperature specs are given at — with copper&apos;s coefficient
          0.00393 /°C (IEC 60028). Resistor caps, suppressors and carbon HT leads, resistors and lamp filaments are not copper and are not corrected. With the
          material on “auto” it is read from the name, and the arithmetic says which was taken.
        </p>
        <p className="mt-1 text-sm text-muted">
          An insulation test has no upper limit: write “open” as its maximum. A meter that reads over its limit (open circuit): write OL.
        </p>
        {source ? (
          <p className="mt-2">
            Started from the card{" "}
            <Link to={`/connectors/${source.slug}`} className="font-semibold text-signal-dark underline">
              {source.name}
            </Link>
            .
          </p>
        ) : null}
      </header>
      <Cautions kinds={cautions} className="max-w-4xl print:py-1.5 print:text-[8pt] print:leading-snug" />
      <Form method="get" aria-label="Bench readings">
        <div className="relative overflow-x-auto">
          <table className="w-full min-w-[900px] border-collapse bg-white text-left text-[0.95rem] print:min-w-0 print:text-[9pt]">
            <thead className="border-b-2 border-ink">
              <tr>
                <th className="p-1.5">What (and how to measure it)</th>
                <th className="p-1.5">Min</th>
                <th className="p-1.5">Max</th>
                <th className="p-1.5">Unit</th>
                <th className="p-1.5">Measured</th>
                <th className="p-1.5">At °C</th>
                <th className="p-1.5">Material</th>
                <th className="p-1.5">At 20 °C</th>
                <th className="p-1.5">Verdict</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r, i) => {
                const res = results[i];
                const ok = res && "verdict" in res ? res : null;
                const err = res && "error" in res ? res : null;
                const units = UNITS.includes(r.unit) ? UNITS : [...UNITS, r.unit];
                return (
                  <tr key={i} className="border-b border-rule align-top" data-row={i}>
                    <td className="p-1.5">
                      <input
                        aria-label={`Row ${i + 1}: what`}
                        name={`n${i}`}
                        defaultValue={r.name}
                        className={`${input} w-full min-w-64`}
                        placeholder="e.g. Pickup 1"
                      />
                      {r.kind ? (
                        <p className="mt-1 text-sm font-semibold" data-kind={r.kind}>
                          {SPEC_KIND_LABELS[specKindOf(r.kind)]}
                        </p>
                      ) : null}
                      {r.conditions.trim() ? (
                        <p className="mt-1 max-w-md text-sm" data-conditions>
                          <span className="font-semibold">Measure:</span> {r.conditions}
                        </p>
                      ) : null}
                      {r.conditions ? <input type="hidden" name={`c${i}`} value={r.conditions} /> : null}
                      {r.kind ? <input type="hidden" name={`k${i}`} value={r.kind} /> : null}
                    </td>
                    <td className="p-1.5">
                      <input
                        aria-label={`Row ${i + 1}: minimum at 20 °C`}
                        name={`lo${i}`}
                        defaultValue={r.min}
                        inputMode="decimal"
                        className={`${input} w-20`}
                      />
                    </td>
                    <td className="p-1.5">
                      <input
                        aria-label={`Row ${i + 1}: maximum at 20 °C`}
                        name={`hi${i}`}
                        defaultValue={r.max}
                        className={`${input} w-20`}
                        placeholder="or open"
                      />
                    </td>
                    <td className="p-1.5">
                      <select aria-label={`Row ${i + 1}: unit`} name={`u${i}`} defaultValue={r.unit} className={select}>
                        {units.map((u) => (
                          <option key={u}>{u}</option>
                        ))}
                      </select>
                    </td>
                    <td className="p-1.5">
                      <input
                        aria-label={`Row ${i + 1}: measured`}
                        name={`m${i}`}
                        defaultValue={r.measured}
                        aria-invalid={err ? true : undefined}
                        className={`${input} w-24 font-semibold`}
                        placeholder="or OL"
                      />
                    </td>
                    <td className="p-1.5">
                      <input
                        aria-label={`Row ${i + 1}: temperature °C`}
                        name={`t${i}`}
                        defaultValue={r.tempC}
                        inputMode="decimal"
                        className={`${input} w-16`}
                        placeholder="°C"
                      />
                    </td>
                    <td className="p-1.5">
                      <select aria-label={`Row ${i + 1}: material`} name={`mt${i}`} defaultValue={r.material} className={select}>
                        <option value="">auto (from the name)</option>
                        {SPEC_MATERIALS.map((m) => (
                          <option key={m} value={m}>
                            {MATERIAL_WORDS[m]}
                          </option>
                        ))}
                      </select>
                      {ok && ok.materialBy !== "given" ? (
                        <p className="mt-1 text-xs text-muted" data-material={ok.material}>
                          auto: {MATERIAL_WORDS[ok.material]}
                        </p>
                      ) : null}
                    </td>
                    <td className="p-1.5 whitespace-nowrap">{ok ? shownValue(ok) : ""}</td>
                    <td className="p-1.5">
                      {ok ? (
                        <span data-verdict={ok.verdict} className={`font-bold ${ok.verdict === "in_range" ? "" : "text-signal-dark"}`}>
                          {ok.verdict === "in_range" ? "✓ " : "✗ "}
                          {VERDICT[ok.verdict]}
                        </span>
                      ) : null}
                      {err ? (
                        <span role="alert" className="text-sm font-semibold text-signal-dark">
                          {err.error}
                        </span>
                      ) : null}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <div className="no-print mt-3 flex flex-wrap items-center gap-3">
          <button type="submit" name="rows" value={rows.length} className="rounded bg-signal px-4 py-2 font-semibold text-white hover:bg-signal-dark">
            Check readings
          </button>
          <button
            type="submit"
            name="rows"
            value={Math.min(MAX_ROWS, rows.length + 3)}
            className="rounded border-2 border-ink bg-white px-3 py-1.5 font-semibold"
          >
            Add rows
          </button>
          <span className="text-sm text-muted">
            The sheet lives in its address: bookmark or share it
            {link ? (
              <>
                {" "}
                (
                <a href={`/bench${link}`} className="underline">
                  this sheet
                </a>
                )
              </>
            ) : null}
            , or print it.
          </span>
        </div>
      </Form>
      {results.some((r) => r && "steps" in r) ? (
        <section aria-labelledby="arith" className="print-avoid-break">
          <h2 id="arith" className="text-xl font-bold">
            The arithmetic
          </h2>
          <ol className="mt-2 space-y-2 text-sm">
            {results.map((r, i) =>
              r && "steps" in r ? (
                <li key={i} className="rounded border border-rule bg-white p-2">
                  <p className="font-semibold">{r.name}</p>
                  <ul className="list-disc pl-5">
                    {r.steps.map((s, j) => (
                      <li key={j}>{s}</li>
                    ))}
                  </ul>
                </li>
              ) : null,
            )}
          </ol>
        </section>
      ) : null}
      <p className="text-sm text-muted">
        Measure each value under the conditions given with it; a resistance with the ignition off and the part unplugged. Zero the meter on its leads first for
        readings under a few ohms.
      </p>
    </div>
  );
}
