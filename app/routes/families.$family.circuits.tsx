import { data, Link } from "react-router";
import type { Route } from "./+types/families.$family.circuits";
import { Cautions } from "~/components/cautions";
import { listCircuits } from "~/services/circuits.server";

export const meta: Route.MetaFunction = ({ loaderData }) => [
  { title: loaderData ? `Circuits · ${loaderData.family.make.name} ${loaderData.family.name} · Loomlore` : "Not found · Loomlore" },
];

export async function loader({ params }: Route.LoaderArgs) {
  const found = await listCircuits(params.family);
  if (!found) throw data(`There is no family “${params.family}” in the library.`, { status: 404 });
  return found;
}

const SYSTEM_ORDER = ["ignition", "charging", "starting", "lighting", "signals", "instruments"];

export default function CircuitsPage({ loaderData }: Route.ComponentProps) {
  const { family, circuits, wastedSpark } = loaderData;
  const systems = SYSTEM_ORDER.filter((s) => circuits.some((c) => c.system === s));
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
        ›{" "}
        <Link to={`/families/${family.slug}`} className="underline">
          {family.name}
        </Link>{" "}
        › Circuits
      </nav>
      <header className="max-w-3xl">
        <h1 className="text-3xl font-bold">
          Circuit walk: {family.make.name} {family.name}
        </h1>
        <p className="mt-1 text-muted">
          Pick a circuit to follow the power from the battery through switches, fuses and connectors to the load and back, with what your meter should read at
          each probe point.
        </p>
      </header>
      <div className="grid gap-6 lg:grid-cols-[1fr_360px]">
        <div className="space-y-5">
          {systems.map((s) => (
            <section key={s} aria-labelledby={`c-${s}`}>
              <h2 id={`c-${s}`} className="border-b-2 border-ink pb-1 text-xl font-bold capitalize">
                {s}
              </h2>
              <ul className="mt-2 divide-y divide-rule rounded-md border border-rule bg-white">
                {circuits
                  .filter((c) => c.system === s)
                  .map((c) => (
                    <li key={c.slug} className="flex flex-wrap items-baseline justify-between gap-2 px-3 py-2">
                      <Link to={`/families/${family.slug}/circuits/${c.slug}`} className="font-semibold text-signal-dark underline">
                        {c.name}
                      </Link>
                      <span className="text-sm text-muted">{c.powered ? "voltmeter, battery connected" : "ohmmeter, ignition off"}</span>
                    </li>
                  ))}
              </ul>
            </section>
          ))}
        </div>
        <aside className="space-y-4">
          <section aria-labelledby="ws" className="rounded-md border border-rule bg-white p-4">
            <h2 id="ws" className="text-lg font-bold">
              Coil pairing (wasted spark)
            </h2>
            <p className="mt-1 text-sm">
              Firing order <strong>{family.firingOrder}</strong>, {family.cylinders} cylinders{family.crankDeg ? `, ${family.crankDeg}° crank` : ""}.
            </p>
            {wastedSpark.pairs.length > 0 && wastedSpark.suitable ? (
              <p className="mt-2 text-lg font-semibold" data-testid="pairs">
                {wastedSpark.pairs.map((p) => `${p[0]} & ${p[1]}`).join(" · ")}
              </p>
            ) : null}
            <p className="mt-2 text-sm">{wastedSpark.reason}</p>
            <p className="mt-2 text-xs text-muted">{wastedSpark.method}</p>
          </section>
          <Cautions kinds={["ignition", "battery"]} />
        </aside>
      </div>
    </div>
  );
}
