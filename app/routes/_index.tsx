import { Form, Link, redirect } from "react-router";
import type { Route } from "./+types/_index";
import { listFamilies, listMakes } from "~/services/library.server";
import { resolveFamily } from "~/services/jump.server";
import { homeQuery } from "~/validation/pages";
import { searchParams } from "~/validation/library";

export const meta: Route.MetaFunction = () => [
  { title: "Loomlore · connector cards for classic bike looms" },
  { name: "description", content: "Find your bike family, open its connector cards and read which cavity carries which wire colour." },
];

export async function loader({ request }: Route.LoaderArgs) {
  const typed = homeQuery.parse(searchParams(request)).family;
  if (typed) {
    const slug = await resolveFamily(typed);
    if (slug) throw redirect(`/families/${slug}`);
  }
  const [makes, { families }] = await Promise.all([listMakes(), listFamilies({ limit: 100, offset: 0 })]);
  return { makes, families, typed, missed: Boolean(typed) };
}

export default function Home({ loaderData }: Route.ComponentProps) {
  const { makes, families, typed, missed } = loaderData;
  return (
    <div className="space-y-8">
      <section className="max-w-3xl">
        <h1 className="text-3xl leading-tight font-bold sm:text-4xl">Which wire goes where?</h1>
        <p className="mt-2 text-lg text-muted">
          Pick your bike&apos;s make and family, open a connector card, and read each cavity&apos;s wire colour from the side you are looking at.
        </p>
        <Form method="get" className="mt-4 flex flex-wrap items-end gap-2" role="search" aria-label="Jump to a family">
          <label className="flex flex-col text-sm font-semibold">
            Jump to a family
            <input
              name="family"
              list="family-names"
              defaultValue={typed ?? ""}
              placeholder="e.g. RX750 Four"
              autoComplete="off"
              className="mt-1 w-72 rounded border-2 border-ink bg-white px-3 py-2 text-base font-normal"
            />
          </label>
          <datalist id="family-names">
            {families.map((f) => (
              <option key={f.slug} value={f.name}>{`${f.make.name}, ${f.yearFrom}–${f.yearTo}`}</option>
            ))}
          </datalist>
          <button type="submit" className="rounded bg-signal px-4 py-2 text-base font-semibold text-white hover:bg-signal-dark">
            Open
          </button>
        </Form>
        {missed ? (
          <p role="status" className="mt-2 font-semibold text-signal-dark">
            No single family matches “{typed}”. Pick one from the list below.
          </p>
        ) : null}
      </section>

      <section aria-labelledby="tools-heading">
        <h2 id="tools-heading" className="text-xl font-bold">
          Workshop tools
        </h2>
        <ul className="mt-2 grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
          {[
            { to: "/finder", title: "Colour finder", body: "The plug is gone: enter the colours left on the wires and see which connector they came from." },
            {
              to: "/families/rx750-four/circuits",
              title: "Circuit walk",
              body: "Follow a circuit point by point with what your meter should read, and find where the power stops.",
            },
            { to: "/bench", title: "Bench sheet", body: "Check coil, pickup and wire resistances against spec, corrected to 20 °C." },
            { to: "/planner", title: "Loom planner", body: "Keep the circuits you need and get a cut list with wire sizes and fuses." },
          ].map((t) => (
            <li key={t.to}>
              <Link to={t.to} className="block h-full rounded-md border border-rule bg-white p-3 text-ink no-underline hover:border-ink">
                <span className="block font-semibold text-signal-dark underline">{t.title}</span>
                <span className="mt-1 block text-sm text-muted">{t.body}</span>
              </Link>
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="makes-heading">
        <h2 id="makes-heading" className="sr-only">
          Makes and families
        </h2>
        <div className="grid gap-5 md:grid-cols-3">
          {makes.map((m) => (
            <article key={m.slug} className="rounded-lg border-2 border-ink/80 bg-white p-4">
              <h3 className="text-xl font-bold">
                <Link to={`/makes/${m.slug}`} className="text-ink">
                  {m.name}
                </Link>
              </h3>
              <p className="text-sm text-muted">
                {m.familyCount} families · colours in{" "}
                <Link to={`/colours#system-${m.colourSystem}`} className="underline">
                  {m.colourSystem.toUpperCase()} notation
                </Link>
              </p>
              <ul className="mt-3 divide-y divide-rule">
                {families
                  .filter((f) => f.make.slug === m.slug)
                  .map((f) => (
                    <li key={f.slug} className="py-2">
                      <Link to={`/families/${f.slug}`} className="font-semibold text-signal-dark">
                        {f.name}
                      </Link>
                      <span className="block text-sm text-muted">
                        {f.yearFrom}–{f.yearTo} · {f.displacementCc} cc {f.engine.split(",")[0]}
                      </span>
                    </li>
                  ))}
              </ul>
            </article>
          ))}
        </div>
      </section>
    </div>
  );
}
