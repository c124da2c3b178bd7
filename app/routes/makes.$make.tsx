import { data, Link } from "react-router";
import type { Route } from "./+types/makes.$make";
import { getMake } from "~/services/library.server";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: loaderData ? `${loaderData.make.name} · Loomlore` : "Not found · Loomlore" }];

export async function loader({ params }: Route.LoaderArgs) {
  const found = await getMake(params.make);
  if (!found) throw data(`There is no make “${params.make}” in the library.`, { status: 404 });
  return found;
}

export default function MakePage({ loaderData }: Route.ComponentProps) {
  const { make, families } = loaderData;
  return (
    <div className="space-y-5">
      <nav aria-label="Breadcrumb" className="text-sm">
        <Link to="/" className="underline">
          Library
        </Link>{" "}
        › {make.name}
      </nav>
      <header>
        <h1 className="text-3xl font-bold">{make.name}</h1>
        <p className="mt-1 max-w-3xl text-muted">{make.blurb}</p>
      </header>
      <table className="w-full max-w-4xl border-collapse bg-white text-left">
        <thead className="border-b-2 border-ink">
          <tr>
            <th className="p-2">Family</th>
            <th className="p-2">Years</th>
            <th className="p-2">Engine</th>
            <th className="p-2">Ignition</th>
          </tr>
        </thead>
        <tbody>
          {families.map((f) => (
            <tr key={f.slug} className="border-b border-rule align-top">
              <td className="p-2">
                <Link to={`/families/${f.slug}`} className="font-semibold text-signal-dark">
                  {f.name}
                </Link>
                <span className="block text-sm text-muted">{f.modelRange}</span>
              </td>
              <td className="p-2 whitespace-nowrap">
                {f.yearFrom}–{f.yearTo}
              </td>
              <td className="p-2">
                {f.displacementCc} cc, {f.engine}
              </td>
              <td className="p-2">{f.ignition}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
