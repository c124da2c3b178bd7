import { useEffect, useRef, useState } from "react";
import { Form, useFetcher } from "react-router";
import type { Route } from "./+types/colours";
import { ColourChip } from "~/components/colour-chip";
import { colourSystems, describeColour, houseStyles, swatch, type ColourName, type ColourSystemId } from "~/domain/colours";
import { decodeForMake, type DecodeAnswer } from "~/services/colours.server";
import { listMakes } from "~/services/library.server";
import { decodeQuery, searchParams } from "~/validation/library";
import { coloursFormQuery } from "~/validation/pages";
import { issueSentence } from "~/validation/forms";

export const meta: Route.MetaFunction = () => [
  { title: "Colour codes and translator · Loomlore" },
  { name: "description", content: "Translate a wire colour code between Japanese-style letters, IEC 60757, DIN, the older British code and English names." },
];

const SYSTEMS: { id: "auto" | ColourSystemId; label: string }[] = [
  { id: "auto", label: "Work it out" },
  { id: "jis", label: "Japanese-style letters" },
  { id: "iec", label: "IEC 60757" },
  { id: "din", label: "DIN (sw/rt, SWRT)" },
  { id: "bs", label: "Older British letters" },
  { id: "en", label: "English names" },
];

type Value = Extract<DecodeAnswer, { ok: true }>["value"];
type Decoded = { ok: true; value: Value } | { ok: false; message: string } | null;
type Typed = { code: string; system: string; make: string };

export async function loader({ request }: Route.LoaderArgs) {
  const form: Typed = coloursFormQuery.parse(searchParams(request));
  const makes = (await listMakes()).map(({ slug, name, colourSystem, houseStyle }) => ({ slug, name, colourSystem, houseStyle }));
  let decoded: Decoded = null;
  if (form.code.trim()) {
    const q = decodeQuery.safeParse(searchParams(request));
    if (!q.success) decoded = { ok: false, message: issueSentence(q.error.issues).message };
    else {
      const r = await decodeForMake(q.data);
      decoded = r.ok ? { ok: true, value: r.value } : { ok: false, message: r.message };
    }
  }
  // The Japanese-style houses beyond the usual table, shown under it so a rider can see why Bl reads two ways.
  const houses = houseStyles("jis").filter((h) => h.id !== "jis-letters");
  return { systems: colourSystems(), houses, makes, form, decoded };
}

const decodeUrl = (t: Typed) =>
  `/api/v1/colours/decode?code=${encodeURIComponent(t.code)}&system=${encodeURIComponent(t.system)}${t.make ? `&make=${encodeURIComponent(t.make)}` : ""}`;

export default function ColoursPage({ loaderData }: Route.ComponentProps) {
  const { systems, houses, makes, form } = loaderData;
  const fetcher = useFetcher<Value | { error: { message: string } }>();
  const [typed, setTyped] = useState<Typed>(form);
  const timer = useRef<ReturnType<typeof setTimeout>>(undefined);
  useEffect(() => () => clearTimeout(timer.current), []);

  // With JavaScript: decode as the rider types (debounced) through the JSON route; without it, the form submits.
  const onChange = (next: Typed) => {
    setTyped(next);
    clearTimeout(timer.current);
    if (!next.code.trim()) return;
    timer.current = setTimeout(() => fetcher.load(decodeUrl(next)), 150);
  };
  const live: Decoded =
    fetcher.data && typed.code.trim()
      ? "error" in fetcher.data
        ? { ok: false, message: fetcher.data.error.message }
        : { ok: true, value: fetcher.data }
      : null;
  const shown = typed.code === form.code && typed.system === form.system && typed.make === form.make ? loaderData.decoded : live;

  return (
    <div className="space-y-8">
      <section className="max-w-3xl">
        <h1 className="text-3xl font-bold">Colour codes</h1>
        <p className="mt-1 text-muted">
          Type a code as it is written on a diagram or a tag — <code>W/R</code>, <code>ws/rt</code>, <code>SWRT</code>, <code>GU</code>, <code>blk/wht</code> —
          and see what colour it means in each notation. Pick the make to read it the way that maker writes.
        </p>
        <Form method="get" className="mt-4 flex flex-wrap items-end gap-3" aria-label="Translate a colour code">
          <label className="flex flex-col text-sm font-semibold">
            Code
            <input
              name="code"
              value={typed.code}
              onChange={(e) => onChange({ ...typed, code: e.target.value })}
              autoComplete="off"
              spellCheck={false}
              className="mt-1 w-48 rounded border-2 border-ink bg-white px-3 py-2 font-mono text-base"
              placeholder="W/R"
            />
          </label>
          <label className="flex flex-col text-sm font-semibold">
            Notation
            <select
              name="system"
              value={typed.system}
              onChange={(e) => onChange({ ...typed, system: e.target.value })}
              className="mt-1 rounded border-2 border-ink bg-white px-2 py-2 text-base"
            >
              {SYSTEMS.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.label}
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col text-sm font-semibold">
            Make
            <select
              name="make"
              value={typed.make}
              onChange={(e) => onChange({ ...typed, make: e.target.value })}
              className="mt-1 rounded border-2 border-ink bg-white px-2 py-2 text-base"
            >
              <option value="">any make</option>
              {makes.map((m) => (
                <option key={m.slug} value={m.slug}>
                  {m.name} ({m.houseStyle || m.colourSystem})
                </option>
              ))}
            </select>
          </label>
          <button type="submit" className="rounded bg-signal px-4 py-2 font-semibold text-white hover:bg-signal-dark">
            Translate
          </button>
        </Form>
        <div aria-live="polite" className="mt-4" data-testid="decode-result">
          {shown ? <DecodeResultView result={shown} /> : null}
        </div>
      </section>

      {systems.map((s) => (
        <section key={s.id} id={`system-${s.id}`} aria-labelledby={`h-${s.id}`}>
          <h2 id={`h-${s.id}`} className="border-b-2 border-ink pb-1 text-xl font-bold">
            {s.name} <span className="text-base font-normal text-muted">({s.id})</span>
          </h2>
          <CodeList codes={s.codes} />
          {s.id === "jis" ? (
            <div className="mt-4 space-y-4">
              <p className="max-w-3xl text-sm text-muted">
                These are the usual letters (house style <code>jis-letters</code>). Some makers write them their own way, so the same letters can mean another
                colour; with a make chosen above, its way is used, and without one every reading is listed.
              </p>
              {houses.map((h) => (
                <section key={h.id} id={`house-${h.id}`} aria-labelledby={`h-house-${h.id}`}>
                  <h3 id={`h-house-${h.id}`} className="font-bold">
                    {h.name}{" "}
                    <span className="font-normal text-muted">
                      (<code>{h.id}</code>; {h.source})
                    </span>
                  </h3>
                  <CodeList codes={h.codes} />
                </section>
              ))}
            </div>
          ) : null}
        </section>
      ))}
    </div>
  );
}

function CodeList({ codes }: { codes: { code: string; colour: ColourName }[] }) {
  return (
    <ul className="mt-2 grid grid-cols-2 gap-x-6 gap-y-1 sm:grid-cols-3 lg:grid-cols-5">
      {codes.map((c) => (
        <li key={`${c.code}-${c.colour}`}>
          <ColourChip baseHex={swatch(c.colour).hex} tracerHexes={[]} code={c.code} words={c.colour} />
        </li>
      ))}
    </ul>
  );
}

function DecodeResultView({ result }: { result: NonNullable<Decoded> }) {
  if (!result.ok)
    return (
      <p role="alert" className="rounded border-l-4 border-signal bg-white px-3 py-2 font-semibold text-signal-dark">
        {result.message}
      </p>
    );
  const d = result.value;
  // The house is worth naming where it decides the reading: Japanese-style codes, or a make's own way of writing.
  const house = d.houseStyle && (d.system === "jis" || d.make) ? `, house style ${d.houseStyle}` : "";
  return (
    <div className="rounded-md border border-rule bg-white p-4">
      <p className="text-lg">
        <ColourChip baseHex={swatch(d.colours[0]).hex} tracerHexes={d.colours.slice(1).map((c) => swatch(c).hex)} code={d.input} />{" "}
        <strong>{describeColour(d)}</strong>{" "}
        <span className="text-muted" data-testid="decode-read-as">
          read as {d.system.toUpperCase()}
          {house}
          {d.make ? ` (${d.make.name})` : ""}
        </span>
      </p>
      <p className="mt-1">
        IEC 60757: <code className="font-semibold">{d.iec ?? "no code in the standard"}</code>
      </p>
      {d.warnings.map((w) => (
        <p key={w.code} role="note" data-warning={w.code} className="mt-2 rounded border-l-4 border-caution-edge bg-caution px-3 py-2">
          <span aria-hidden="true">⚠ </span>
          {w.message}
        </p>
      ))}
      {d.ambiguities.length > 0 ? (
        <div className="mt-2">
          <p className="font-semibold">Other readings:</p>
          <ul className="list-disc pl-6">
            {d.ambiguities.map((a, i) => (
              <li key={i}>
                <span className="font-semibold">{a.system.toUpperCase()}</span>
                {a.houseStyle ? (
                  <>
                    {" "}
                    (<code>{a.houseStyle}</code>)
                  </>
                ) : null}
                : {a.reading}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </div>
  );
}
