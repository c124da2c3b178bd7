import { useEffect, useRef, useState } from "react";
import { Form, useFetcher } from "react-router";
import type { Route } from "./+types/colours";
import { ColourChip } from "~/components/colour-chip";
import { colourSystems, decodeColour, describeColour, swatch, type ColourSystemId, type DecodedColour } from "~/domain/colours";

export const meta: Route.MetaFunction = () => [
  { title: "Colour codes and translator · Loomlore" },
  { name: "description", content: "Translate a wire colour code between Japanese-style letters, IEC 60757, DIN, the older British code and English names." },
];

const SYSTEMS: { id: "auto" | ColourSystemId; label: string }[] = [
  { id: "auto", label: "Work it out" }, { id: "jis", label: "Japanese-style letters" }, { id: "iec", label: "IEC 60757" },
  { id: "din", label: "DIN (sw/rt, SWRT)" }, { id: "bs", label: "Older British letters" }, { id: "en", label: "English names" },
];

type Decoded = { ok: true; value: DecodedColour } | { ok: false; message: string } | null;

function decodeFor(code: string, system: string): Decoded {
  if (!code.trim()) return null;
  const r = decodeColour(code, (SYSTEMS.some((s) => s.id === system) ? system : "auto") as ColourSystemId | "auto");
  return r.ok ? { ok: true, value: r.value } : { ok: false, message: r.error.message };
}

export function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const code = url.searchParams.get("code") ?? "";
  const system = url.searchParams.get("system") ?? "auto";
  return { systems: colourSystems(), code, system, decoded: decodeFor(code, system) };
}

export default function ColoursPage({ loaderData }: Route.ComponentProps) {
  const { systems, code, system } = loaderData;
  const fetcher = useFetcher<DecodedColour | { error: { message: string } }>();
  const [typed, setTyped] = useState({ code, system });
  const timer = useRef<ReturnType<typeof setTimeout>>(undefined);
  useEffect(() => () => clearTimeout(timer.current), []);

  // With JavaScript: decode as the rider types (debounced) through the JSON route; without it, the form submits.
  const onChange = (next: { code: string; system: string }) => {
    setTyped(next);
    clearTimeout(timer.current);
    if (!next.code.trim()) return;
    timer.current = setTimeout(() => fetcher.load(`/api/v1/colours/decode?code=${encodeURIComponent(next.code)}&system=${next.system}`), 150);
  };
  const live: Decoded = fetcher.data && typed.code.trim()
    ? "error" in fetcher.data ? { ok: false, message: fetcher.data.error.message } : { ok: true, value: fetcher.data }
    : null;
  const shown = typed.code === code && typed.system === system ? loaderData.decoded : live;

  return (
    <div className="space-y-8">
      <section className="max-w-3xl">
        <h1 className="text-3xl font-bold">Colour codes</h1>
        <p className="mt-1 text-muted">Type a code as it is written on a diagram or a tag — <code>W/R</code>, <code>ws/rt</code>, <code>SWRT</code>, <code>GU</code>, <code>blk/wht</code> — and see what colour it means in each notation.</p>
        <Form method="get" className="mt-4 flex flex-wrap items-end gap-3" aria-label="Translate a colour code">
          <label className="flex flex-col text-sm font-semibold">Code
            <input name="code" value={typed.code} onChange={(e) => onChange({ ...typed, code: e.target.value })} autoComplete="off" spellCheck={false}
              className="mt-1 w-48 rounded border-2 border-ink bg-white px-3 py-2 font-mono text-base" placeholder="W/R" />
          </label>
          <label className="flex flex-col text-sm font-semibold">Notation
            <select name="system" value={typed.system} onChange={(e) => onChange({ ...typed, system: e.target.value })} className="mt-1 rounded border-2 border-ink bg-white px-2 py-2 text-base">
              {SYSTEMS.map((s) => <option key={s.id} value={s.id}>{s.label}</option>)}
            </select>
          </label>
          <button type="submit" className="rounded bg-signal px-4 py-2 font-semibold text-white hover:bg-signal-dark">Translate</button>
        </Form>
        <div aria-live="polite" className="mt-4" data-testid="decode-result">
          {shown ? <DecodeResultView result={shown} /> : null}
        </div>
      </section>

      {systems.map((s) => (
        <section key={s.id} id={`system-${s.id}`} aria-labelledby={`h-${s.id}`}>
          <h2 id={`h-${s.id}`} className="border-b-2 border-ink pb-1 text-xl font-bold">{s.name} <span className="text-base font-normal text-muted">({s.id})</span></h2>
          <ul className="mt-2 grid grid-cols-2 gap-x-6 gap-y-1 sm:grid-cols-3 lg:grid-cols-5">
            {s.codes.map((c) => (
              <li key={`${c.code}-${c.colour}`}><ColourChip baseHex={swatch(c.colour).hex} tracerHexes={[]} code={c.code} words={c.colour} /></li>
            ))}
          </ul>
        </section>
      ))}
    </div>
  );
}

function DecodeResultView({ result }: { result: NonNullable<Decoded> }) {
  if (!result.ok) return <p role="alert" className="rounded border-l-4 border-signal bg-white px-3 py-2 font-semibold text-signal-dark">{result.message}</p>;
  const d = result.value;
  return (
    <div className="rounded-md border border-rule bg-white p-4">
      <p className="text-lg">
        <ColourChip baseHex={swatch(d.colours[0]).hex} tracerHexes={d.colours.slice(1).map((c) => swatch(c).hex)} code={d.input} />{" "}
        <strong>{describeColour(d)}</strong> <span className="text-muted">read as {d.system.toUpperCase()}</span>
      </p>
      <p className="mt-1">IEC 60757: <code className="font-semibold">{d.iec ?? "no code in the standard"}</code></p>
      {d.ambiguities.length > 0 ? (
        <div className="mt-2">
          <p className="font-semibold">Other readings:</p>
          <ul className="list-disc pl-6">{d.ambiguities.map((a, i) => <li key={i}><span className="font-semibold">{a.system.toUpperCase()}</span>: {a.reading}</li>)}</ul>
        </div>
      ) : null}
    </div>
  );
}
