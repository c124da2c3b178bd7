import { Form, Link } from "react-router";
import type { Route } from "./+types/bench";
import { benchReading, type BenchResult } from "~/domain/bench";
import { getConnectorCard } from "~/services/library.server";

export const meta: Route.MetaFunction = () => [
  { title: "Bench sheet: resistances against spec · Loomlore" },
  { name: "description", content: "Check measured resistances of pickups, coils, caps and wire runs against their ranges, corrected to 20 °C." },
];

interface Row { name: string; min: string; max: string; unit: string; measured: string; tempC: string; copper: "" | "yes" | "no" }
const FIELDS = ["name", "min", "max", "unit", "measured", "tempC", "copper"] as const;
const KEY: Record<(typeof FIELDS)[number], string> = { name: "n", min: "lo", max: "hi", unit: "u", measured: "m", tempC: "t", copper: "cu" };
const MAX_ROWS = 40;

const num = (s: string) => (s.trim() === "" ? null : Number(s.trim().replace(",", ".")));

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const q = url.searchParams;
  let rows: Row[] = [];
  for (let i = 0; i < MAX_ROWS; i++) {
    const row = Object.fromEntries(FIELDS.map((f) => [f, q.get(`${KEY[f]}${i}`) ?? ""])) as unknown as Row;
    if (FIELDS.some((f) => row[f] !== "")) rows.push(row);
  }
  // Start a sheet from a connector card's spec values.
  const slug = q.get("connector");
  let source: { slug: string; name: string } | null = null;
  if (slug && rows.length === 0) {
    const card = await getConnectorCard(slug);
    if (card) {
      source = { slug, name: `${card.connector.family.name}: ${card.connector.name}` };
      rows = card.connector.specs.map((s) => ({ name: `${s.name}, between cavities ${s.between[0]} and ${s.between[1]}`, min: String(s.min), max: String(s.max), unit: s.unit, measured: "", tempC: "", copper: "" }));
    }
  }
  // Two spare rows for a new sheet; "Add rows" asks for more. Checking a sheet never grows it by itself.
  const blanks = Math.max(0, Math.min(MAX_ROWS, Number(q.get("rows")) || rows.length + 2) - rows.length);
  const results: (BenchResult | { error: string; field: string } | null)[] = rows.map((r, i) => {
    if (r.measured.trim() === "") return null;
    try {
      return benchReading({
        name: r.name || `Reading ${i + 1}`, min: num(r.min) ?? NaN, max: num(r.max) ?? NaN, unit: r.unit || "Ω",
        measured: num(r.measured) ?? NaN, tempC: num(r.tempC), copper: r.copper === "" ? null : r.copper === "yes",
      }, `row ${i + 1}`);
    } catch (e) {
      if (e instanceof RangeError) return { error: e.message, field: (e as RangeError & { field?: string }).field ?? "" };
      throw e;
    }
  });
  return { rows: [...rows, ...Array.from({ length: blanks }, () => ({ name: "", min: "", max: "", unit: "Ω", measured: "", tempC: "", copper: "" }) as Row)], results, source, link: url.search };
}

const VERDICT = { in_range: "in range", low: "LOW", high: "HIGH" } as const;

export default function BenchPage({ loaderData }: Route.ComponentProps) {
  const { rows, results, source, link } = loaderData;
  const input = "rounded border-2 border-ink/70 px-2 py-1 print:border-0 print:p-0";
  return (
    <div className="space-y-5">
      <header className="max-w-3xl">
        <h1 className="text-3xl font-bold">Bench sheet</h1>
        <p className="mt-1 text-muted">
          Enter what your meter reads and the part&apos;s temperature. Copper windings (pickups, coil primaries and secondaries, stators, a length of wire) read higher when warm, so
          readings are corrected to 20 °C — the temperature specs are given at — with copper&apos;s coefficient 0.00393 /°C (IEC 60028). Resistor caps and carbon parts are not corrected.
        </p>
        {source ? <p className="mt-2">Started from the card <Link to={`/connectors/${source.slug}`} className="font-semibold text-signal-dark underline">{source.name}</Link>.</p> : null}
      </header>
      <Form method="get" aria-label="Bench readings">
        <div className="relative overflow-x-auto">
          <table className="w-full min-w-[860px] border-collapse bg-white text-left text-[0.95rem] print:min-w-0 print:text-[9pt]">
            <thead className="border-b-2 border-ink">
              <tr><th className="p-1.5">What</th><th className="p-1.5">Min</th><th className="p-1.5">Max</th><th className="p-1.5">Unit</th><th className="p-1.5">Measured</th><th className="p-1.5">At °C</th><th className="p-1.5">Copper?</th><th className="p-1.5">At 20 °C</th><th className="p-1.5">Verdict</th></tr>
            </thead>
            <tbody>
              {rows.map((r, i) => {
                const res = results[i];
                const ok = res && "verdict" in res ? res : null;
                const err = res && "error" in res ? res : null;
                return (
                  <tr key={i} className="border-b border-rule align-top" data-row={i}>
                    <td className="p-1.5"><input aria-label={`Row ${i + 1}: what`} name={`n${i}`} defaultValue={r.name} className={`${input} w-full min-w-64`} placeholder="e.g. Pickup 1" /></td>
                    <td className="p-1.5"><input aria-label={`Row ${i + 1}: minimum at 20 °C`} name={`lo${i}`} defaultValue={r.min} inputMode="decimal" className={`${input} w-20`} /></td>
                    <td className="p-1.5"><input aria-label={`Row ${i + 1}: maximum at 20 °C`} name={`hi${i}`} defaultValue={r.max} inputMode="decimal" className={`${input} w-20`} /></td>
                    <td className="p-1.5">
                      <select aria-label={`Row ${i + 1}: unit`} name={`u${i}`} defaultValue={r.unit} className="rounded border-2 border-ink/70 bg-white px-1 py-1">
                        {["mΩ", "Ω", "kΩ", "MΩ"].map((u) => <option key={u}>{u}</option>)}
                      </select>
                    </td>
                    <td className="p-1.5"><input aria-label={`Row ${i + 1}: measured`} name={`m${i}`} defaultValue={r.measured} inputMode="decimal" aria-invalid={err ? true : undefined} className={`${input} w-24 font-semibold`} /></td>
                    <td className="p-1.5"><input aria-label={`Row ${i + 1}: temperature °C`} name={`t${i}`} defaultValue={r.tempC} inputMode="decimal" className={`${input} w-16`} placeholder="°C" /></td>
                    <td className="p-1.5">
                      <select aria-label={`Row ${i + 1}: copper winding`} name={`cu${i}`} defaultValue={r.copper} className="rounded border-2 border-ink/70 bg-white px-1 py-1">
                        <option value="">auto</option><option value="yes">copper</option><option value="no">not copper</option>
                      </select>
                    </td>
                    <td className="p-1.5 whitespace-nowrap">{ok ? `${Number(ok.at20C.toPrecision(4))} ${ok.unit}` : ""}</td>
                    <td className="p-1.5">
                      {ok ? <span data-verdict={ok.verdict} className={`font-bold ${ok.verdict === "in_range" ? "" : "text-signal-dark"}`}>{ok.verdict === "in_range" ? "✓ " : "✗ "}{VERDICT[ok.verdict]}</span> : null}
                      {err ? <span role="alert" className="text-sm font-semibold text-signal-dark">{err.error}</span> : null}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <div className="no-print mt-3 flex flex-wrap items-center gap-3">
          <button type="submit" name="rows" value={rows.length} className="rounded bg-signal px-4 py-2 font-semibold text-white hover:bg-signal-dark">Check readings</button>
          <button type="submit" name="rows" value={Math.min(MAX_ROWS, rows.length + 3)} className="rounded border-2 border-ink bg-white px-3 py-1.5 font-semibold">Add rows</button>
          <span className="text-sm text-muted">The sheet lives in its address: bookmark or share it{link ? <> (<a href={`/bench${link}`} className="underline">this sheet</a>)</> : null}, or print it.</span>
        </div>
      </Form>
      {results.some((r) => r && "steps" in r) ? (
        <section aria-labelledby="arith" className="print-avoid-break">
          <h2 id="arith" className="text-xl font-bold">The arithmetic</h2>
          <ol className="mt-2 space-y-2 text-sm">
            {results.map((r, i) => (r && "steps" in r ? (
              <li key={i} className="rounded border border-rule bg-white p-2"><p className="font-semibold">{r.name}</p><ul className="list-disc pl-5">{r.steps.map((s, j) => <li key={j}>{s}</li>)}</ul></li>
            ) : null))}
          </ol>
        </section>
      ) : null}
      <p className="text-sm text-muted">Measure with the ignition off and the part disconnected; zero the meter on its leads first for readings under a few ohms.</p>
    </div>
  );
}
