import { Form, Link } from "react-router";
import type { Route } from "./+types/review";
import { requireCan } from "~/services/guards.server";
import { listFamilies, listMakes } from "~/services/library.server";
import { reviewQueue } from "~/services/submissions.server";
import { searchParams } from "~/validation/library";
import { reviewQuery } from "~/validation/pages";

export const meta: Route.MetaFunction = () => [{ title: "Review queue · Loomlore" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireCan(request, "review.work");
  const filters = reviewQuery.parse(searchParams(request));
  const [{ items }, makes, { families }] = await Promise.all([reviewQueue(filters), listMakes(), listFamilies({ limit: 100, offset: 0 })]);
  return { items, makes, families, filters };
}

const when = (iso: string) => new Date(iso).toLocaleString("en-GB", { timeZone: "UTC", dateStyle: "medium", timeStyle: "short" });

export default function ReviewQueue({ loaderData }: Route.ComponentProps) {
  const { items, makes, families, filters } = loaderData;
  const link = (q: Record<string, string | undefined>) => {
    const p = new URLSearchParams(Object.entries(q).filter((e): e is [string, string] => !!e[1]));
    return p.size ? `/review?${p}` : "/review";
  };
  return (
    <div className="space-y-6">
      <header>
        <h1 className="text-3xl font-bold">Review queue</h1>
        <p className="mt-1 text-lg">
          Oldest first. Each submission shows what it changes against the published card; mistake reports from riders are here too.
        </p>
      </header>
      <nav aria-label="Filter by make" className="flex flex-wrap gap-2 text-sm">
        <span className="font-semibold">Make:</span>
        <Link to={link({ family: filters.family })} aria-current={!filters.make ? "page" : undefined} className={!filters.make ? "font-bold" : "underline"}>
          all
        </Link>
        {makes.map((m) => (
          <Link
            key={m.slug}
            to={link({ make: m.slug })}
            aria-current={filters.make === m.slug ? "page" : undefined}
            className={filters.make === m.slug ? "font-bold" : "underline"}
          >
            {m.name}
          </Link>
        ))}
      </nav>
      <Form method="get" className="flex flex-wrap items-end gap-2 text-sm">
        {filters.make ? <input type="hidden" name="make" value={filters.make} /> : null}
        <label className="font-semibold">
          Family
          <select name="family" defaultValue={filters.family ?? ""} className="ml-2 rounded border-2 border-ink bg-white px-2 py-1 font-normal">
            <option value="">all</option>
            {families
              .filter((f) => !filters.make || f.make.slug === filters.make)
              .map((f) => (
                <option key={f.slug} value={f.slug}>
                  {f.make.name} {f.name}
                </option>
              ))}
          </select>
        </label>
        <button className="rounded border-2 border-ink bg-white px-3 py-1 font-semibold">Show</button>
      </Form>
      {items.length ? (
        <table className="w-full border-collapse bg-white text-left" data-testid="queue">
          <thead>
            <tr className="border-b-2 border-ink text-sm">
              <th scope="col" className="p-2">
                Waiting since
              </th>
              <th scope="col" className="p-2">
                Item
              </th>
              <th scope="col" className="p-2">
                Family
              </th>
              <th scope="col" className="p-2">
                From
              </th>
            </tr>
          </thead>
          <tbody>
            {items.map((it) => (
              <tr key={it.key} className="border-b border-rule align-top">
                <td className="p-2 text-sm whitespace-nowrap">{when(it.at)}</td>
                {it.submission ? (
                  <>
                    <td className="p-2">
                      <Link to={`/review/${it.key}`} className="font-semibold text-signal-dark underline">
                        {it.submission.title}
                      </Link>{" "}
                      <span className="text-sm text-muted">
                        {it.submission.kind === "edit" ? "edit" : "new card"}
                        {it.submission.lastMessage?.kind === "answer" ? " · answered a question" : ""}
                      </span>
                    </td>
                    <td className="p-2">
                      {it.submission.family
                        ? `${it.submission.family.make.name} ${it.submission.family.name}`
                        : it.submission.familyRequest
                          ? `${it.submission.familyRequest.name} (new family)`
                          : "—"}
                    </td>
                    <td className="p-2">{it.submission.author.displayName}</td>
                  </>
                ) : (
                  <>
                    <td className="p-2">
                      <Link to={`/review/${it.key}`} className="font-semibold text-signal-dark underline">
                        Mistake report: {it.report!.connector.name}
                      </Link>{" "}
                      <span className="block text-sm text-muted">{it.report!.text.slice(0, 120)}</span>
                    </td>
                    <td className="p-2">{it.report!.family.name}</td>
                    <td className="p-2">{it.report!.reporter}</td>
                  </>
                )}
              </tr>
            ))}
          </tbody>
        </table>
      ) : (
        <p className="text-lg text-muted">Nothing waiting{filters.make || filters.family ? " with these filters" : ""}.</p>
      )}
    </div>
  );
}
