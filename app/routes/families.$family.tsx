import { data, Link } from "react-router";
import type { Route } from "./+types/families.$family";
import { FaceView } from "~/components/face-view";
import { faceGeometry } from "~/domain/connector-face";
import { getFamily } from "~/services/library.server";

export const meta: Route.MetaFunction = ({ loaderData }) => [
  {
    title: loaderData
      ? `${loaderData.family.make.name} ${loaderData.family.name} (${loaderData.family.yearFrom}–${loaderData.family.yearTo}) · Loomlore`
      : "Not found · Loomlore",
  },
];

export async function loader({ params }: Route.LoaderArgs) {
  const found = await getFamily(params.family);
  if (!found) throw data(`There is no family “${params.family}” in the library.`, { status: 404 });
  return found;
}

export default function FamilyPage({ loaderData }: Route.ComponentProps) {
  const { family } = loaderData;
  const facts: [string, string][] = [
    ["Years", `${family.yearFrom}–${family.yearTo}`],
    ["Models", family.modelRange],
    ["Engine", `${family.displacementCc} cc, ${family.engine}`],
    ["Cylinders", String(family.cylinders)],
    ["Firing order", family.firingOrder],
    ["Ignition", family.ignition],
    ["Colour notation", family.colourSystem.toUpperCase()],
  ];
  return (
    <div className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link to="/" className="underline">
          Library
        </Link>{" "}
        ›{" "}
        <Link to={`/makes/${family.make.slug}`} className="underline">
          {family.make.name}
        </Link>{" "}
        › {family.name}
      </nav>
      <header className="max-w-4xl">
        <h1 className="text-3xl font-bold">
          {family.make.name} {family.name}
        </h1>
        <p className="mt-1 text-muted">{family.blurb}</p>
        <p className="mt-3 flex flex-wrap gap-2">
          <Link to={`/families/${family.slug}/circuits`} className="rounded bg-ink px-3 py-1.5 font-semibold text-paper no-underline">
            Circuit walk
          </Link>
          <Link to={`/planner?family=${family.slug}`} className="rounded border-2 border-ink bg-white px-3 py-1.5 font-semibold text-ink no-underline">
            Plan a minimal loom
          </Link>
          <Link to={`/finder?family=${family.slug}`} className="rounded border-2 border-ink bg-white px-3 py-1.5 font-semibold text-ink no-underline">
            Identify a cut-off plug
          </Link>
        </p>
        <dl className="mt-3 grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-[0.95rem] sm:grid-cols-[max-content_1fr_max-content_1fr]">
          {facts.map(([k, v]) => (
            <div key={k} className="contents">
              <dt className="font-semibold">{k}</dt>
              <dd>
                {k === "Colour notation" ? (
                  <Link to={`/colours#system-${family.colourSystem}`} className="underline">
                    {v}
                  </Link>
                ) : (
                  v
                )}
              </dd>
            </div>
          ))}
        </dl>
      </header>
      {family.systems.map((s) => (
        <section key={s.kind} aria-labelledby={`sys-${s.kind}`}>
          <h2 id={`sys-${s.kind}`} className="border-b-2 border-ink pb-1 text-2xl font-bold">
            {s.name}
          </h2>
          <ul className="mt-3 grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
            {s.connectors.map((c) => (
              <li key={c.slug}>
                <Link to={`/connectors/${c.slug}`} className="flex gap-3 rounded-md border border-rule bg-white p-3 text-ink no-underline hover:border-ink">
                  <span className="w-24 shrink-0">
                    <FaceView geometry={faceGeometry(c.layout)} paint={c.paint} size="thumb" caption={`Mating face of ${c.name}`} />
                  </span>
                  <span>
                    <span className="block font-semibold text-signal-dark underline">{c.name}</span>
                    <span className="block text-sm">
                      {c.pinCount} wires · {c.housing}
                    </span>
                    <span className="block text-sm text-muted">{c.location}</span>
                  </span>
                </Link>
              </li>
            ))}
          </ul>
        </section>
      ))}
    </div>
  );
}
