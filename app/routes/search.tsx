import { data, Form, Link } from "react-router";
import type { Route } from "./+types/search";
import { activeFilters, countOf, facetEntries, groupHits, HIT_GROUPS, searchHref, type FilterKey, type HitType, type SearchState } from "~/domain/search-ui";
import { listFamilies, listMakes } from "~/services/library.server";
import { searchLibrary } from "~/services/search.server";
import { searchParams, searchQuery } from "~/validation/library";

export const meta: Route.MetaFunction = ({ loaderData }) => {
  const q = loaderData?.query.q ?? "";
  return [
    { title: q ? `“${q}” · Search · Loomlore` : "Search the library · Loomlore" },
    {
      name: "description",
      content: "Search the library's families, connector cards and pins by family name, circuit, colour code in any notation or terminal number.",
    },
  ];
};

/** What a hand-edited address got wrong, per query-string key. */
const BAD_PARAM: Record<string, string> = {
  q: "the words are too long (200 characters at most)",
  type: "“type” is family, connector or pin",
  make: "“make” is not a make's short name",
  family: "“family” is not a family's short name",
  system: "“system” is one of ignition, charging, starting, lighting, signals or instruments",
  pins: "“pins” (cavities) is a whole number from 1 to 400",
  limit: "“limit” (results per page) is a whole number from 1 to 100",
  offset: "“offset” is a whole number, 0 or more",
};

/** Parse the query string (q, filters, page), run the search unless there is nothing to search for, and name the slugs. */
export async function loader({ request }: Route.LoaderArgs) {
  const parsed = searchQuery.safeParse(searchParams(request));
  if (!parsed.success) {
    const field = String(parsed.error.issues[0]?.path[0] ?? "");
    throw data(
      `This search cannot be run: ${BAD_PARAM[field] ?? parsed.error.issues[0]?.message ?? "the address is not a search"}. Change the address, or start again from the search box.`,
      { status: 400 },
    );
  }
  const query = parsed.data;
  const [makes, { families }] = await Promise.all([listMakes(), listFamilies({ limit: 1000, offset: 0 })]);
  const names = {
    make: Object.fromEntries(makes.map((m) => [m.slug, m.name])) as Record<string, string>,
    family: Object.fromEntries(families.map((f) => [f.slug, f.name])) as Record<string, string>,
  };
  const examples = [families[0]?.name, "pickup", "kill switch", "W/R", "ws/rt", "31d"].filter((x): x is string => Boolean(x));
  const nothingAsked = !query.q && activeFilters(query).length === 0;
  const result = nothingAsked ? null : await searchLibrary(query);
  return { query, names, examples, result };
}

const SYSTEM_LABEL = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
const TYPE_LABEL = (t: string) => HIT_GROUPS.find((g) => g.type === t)?.label ?? t;

export default function SearchPage({ loaderData }: Route.ComponentProps) {
  const { query, names, examples, result } = loaderData;
  const state: SearchState = query;
  const filters = activeFilters(state);
  const filterLabel = (key: FilterKey, value: string): string => {
    switch (key) {
      case "type":
        return TYPE_LABEL(value);
      case "make":
        return names.make[value] ?? value;
      case "family":
        return names.family[value] ?? value;
      case "system":
        return SYSTEM_LABEL(value);
      case "pins":
        return `${value} cavities`;
    }
  };
  const FILTER_NAME: Record<FilterKey, string> = { type: "Type", make: "Make", family: "Family", system: "System", pins: "Cavities" };

  return (
    <div className="space-y-5">
      <header>
        <h1 className="text-3xl font-bold">Search the library</h1>
        <p className="mt-1 max-w-3xl text-muted">
          Type what you have in front of you: a family name, a circuit or part (“pickup”, “kill switch”), a colour code in any notation (<code>W/R</code>,{" "}
          <code>ws/rt</code>) or a terminal number (<code>31d</code>).
        </p>
        <Form method="get" action="/search" role="search" aria-label="Search" className="mt-3 flex max-w-2xl flex-wrap items-end gap-2">
          <label className="flex min-w-0 flex-1 basis-48 flex-col text-sm font-semibold">
            Words
            <input
              key={query.q}
              name="q"
              type="search"
              defaultValue={query.q}
              maxLength={200}
              autoComplete="off"
              spellCheck={false}
              enterKeyHint="search"
              className="mt-1 w-full rounded border-2 border-ink bg-white px-3 py-2 text-base font-normal"
              placeholder="e.g. pickup, W/R, 31d"
            />
          </label>
          {filters.map((f) => (
            <input key={f.key} type="hidden" name={f.key} value={f.value} />
          ))}
          <button type="submit" className="rounded bg-signal px-4 py-2 text-base font-semibold text-white hover:bg-signal-dark">
            Search
          </button>
        </Form>
      </header>

      {filters.length > 0 ? (
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <span className="font-semibold">Only showing:</span>
          <ul aria-label="Active filters" className="flex flex-wrap gap-2">
            {filters.map((f) => (
              <li key={f.key} className="flex items-center gap-2 rounded-full border-2 border-ink bg-white py-0.5 pr-1 pl-3" data-filter={f.key}>
                <span>
                  {FILTER_NAME[f.key]}: <strong>{filterLabel(f.key, f.value)}</strong>
                </span>
                <Link
                  to={searchHref(state, { [f.key]: null })}
                  className="rounded-full bg-ink px-2 text-paper no-underline hover:bg-signal-dark"
                  data-testid={`remove-${f.key}`}
                >
                  remove
                  <span className="sr-only">
                    {" "}
                    the filter {FILTER_NAME[f.key]}: {filterLabel(f.key, f.value)}
                  </span>
                </Link>
              </li>
            ))}
          </ul>
          {filters.length > 1 ? (
            <Link to={searchHref({ q: query.q })} className="font-semibold text-signal-dark underline">
              Remove all filters
            </Link>
          ) : null}
        </div>
      ) : null}

      {result === null ? (
        <Examples examples={examples} />
      ) : (
        <>
          {result.source === "database" ? (
            <p role="status" className="max-w-3xl rounded border-l-4 border-caution-edge bg-caution px-3 py-2" data-testid="reduced-notice">
              <strong>Reduced results.</strong> The search service is not answering just now, so these come from the library&apos;s own index: words match only
              from their start (whole-word prefixes, so “pick” finds pickup but “ickup” does not), and typos are not forgiven. Check the spelling, or try again
              in a few minutes.
            </p>
          ) : null}
          {result.total === 0 ? (
            <NoResults q={query.q} reduced={result.source === "database"} withoutFilters={filters.length ? searchHref({ q: query.q }) : null} />
          ) : (
            <div className="grid gap-6 lg:grid-cols-[15rem_1fr]">
              <section aria-labelledby="results-heading" className="min-w-0 lg:order-2">
                <h2 id="results-heading" className="sr-only">
                  Results
                </h2>
                <p className="text-muted" data-testid="results-summary">
                  <span className="font-semibold text-ink">{result.total}</span> {result.total === 1 ? "result" : "results"}
                  {query.q ? <> for “{query.q}”</> : null}
                  {result.total > result.hits.length ? (
                    <>
                      {" "}
                      · showing {query.offset + 1}–{query.offset + result.hits.length}
                    </>
                  ) : null}
                  <a href="#facets" className="ml-2 font-semibold text-signal-dark underline lg:hidden">
                    Narrow down
                  </a>
                </p>
                {result.hits.length === 0 ? (
                  <p className="mt-3">
                    This page is past the last result.{" "}
                    <Link to={searchHref(state, {})} className="font-semibold text-signal-dark underline">
                      Back to the first page
                    </Link>
                  </p>
                ) : null}
                <div className="mt-3 space-y-5">
                  {groupHits(result.hits).map((g) => {
                    const all = result.facets.type[g.type] ?? g.hits.length;
                    return (
                      <section key={g.type} aria-labelledby={`group-${g.type}`} data-group={g.type}>
                        <h3 id={`group-${g.type}`} className="flex items-baseline gap-2 border-b-2 border-ink pb-1 text-xl font-bold">
                          {g.label}
                          <span className="rounded-full bg-ink px-2 text-sm font-semibold text-paper" data-testid="group-count">
                            <span className="sr-only">(</span>
                            {all}
                            <span className="sr-only"> in all)</span>
                          </span>
                          {all > g.hits.length && !query.type ? (
                            <Link to={searchHref(state, { type: g.type })} className="ml-auto text-sm font-semibold text-signal-dark underline">
                              All {countOf(g.type, all)}
                            </Link>
                          ) : null}
                        </h3>
                        <ul className="divide-y divide-rule">
                          {g.hits.map((h) => (
                            <li key={h.url} className="py-2" data-type={h.type}>
                              <Link to={h.url} className="font-semibold text-signal-dark underline">
                                {h.title}
                              </Link>
                              <p className="text-sm break-words">{h.subtitle}</p>
                              <p className="text-sm text-muted" data-testid="hit-owner">
                                {h.type === "family" ? (
                                  h.make
                                ) : (
                                  <>
                                    {h.family} · {h.make}
                                  </>
                                )}
                              </p>
                            </li>
                          ))}
                        </ul>
                      </section>
                    );
                  })}
                </div>
                <Pager state={state} total={result.total} limit={query.limit} offset={query.offset} />
              </section>

              <nav id="facets" aria-label="Narrow the results" className="space-y-4 lg:order-1">
                <h2 className="text-lg font-bold">Narrow down</h2>
                <Facet
                  name="type"
                  title="Type"
                  counts={result.facets.type}
                  state={state}
                  label={TYPE_LABEL}
                  order={(e) => HIT_GROUPS.flatMap((g) => e.filter(([v]) => v === (g.type as HitType)))}
                />
                <Facet name="make" title="Make" counts={result.facets.make} state={state} label={(v) => names.make[v] ?? v} />
                <Facet name="family" title="Family" counts={result.facets.family} state={state} label={(v) => names.family[v] ?? v} />
                <Facet name="system" title="System" counts={result.facets.system} state={state} label={SYSTEM_LABEL} />
                <Facet name="pins" title="Cavities" counts={result.facets.pinCount} state={state} label={(v) => `${v} cavities`} numeric />
              </nav>
            </div>
          )}
        </>
      )}
    </div>
  );
}

/** One facet: each value a link that adds the filter (or, when it is the active one, removes it). */
function Facet({
  name,
  title,
  counts,
  state,
  label,
  numeric = false,
  order,
}: {
  name: FilterKey;
  title: string;
  counts: Record<string, number>;
  state: SearchState;
  label: (v: string) => string;
  numeric?: boolean;
  order?: (entries: [string, number][]) => [string, number][];
}) {
  const sorted = facetEntries(counts, numeric);
  const entries = order ? order(sorted) : sorted;
  const current = state[name] === undefined || state[name] === null ? null : String(state[name]);
  if (!entries.length && current === null) return null;
  return (
    <section aria-labelledby={`facet-${name}`} data-facet={name}>
      <h3 id={`facet-${name}`} className="text-sm font-bold tracking-wide text-muted uppercase">
        {title}
      </h3>
      <ul className="mt-1 flex flex-wrap gap-1.5 lg:block lg:space-y-0.5">
        {entries.map(([value, n]) => {
          const on = value === current;
          return (
            <li key={value}>
              <Link
                to={searchHref(state, { [name]: on ? null : value })}
                aria-current={on ? "true" : undefined}
                className={`flex items-baseline justify-between gap-3 rounded border px-2 py-1 no-underline lg:border-transparent lg:py-0.5 ${on ? "border-ink bg-ink font-semibold text-paper lg:border-ink" : "border-rule bg-white text-ink hover:border-ink lg:bg-transparent lg:hover:bg-white"}`}
              >
                <span>
                  {on ? "✓ " : ""}
                  {label(value)}
                  {on ? <span className="sr-only"> (chosen; follow to remove)</span> : null}
                </span>
                <span className={`text-sm ${on ? "text-paper" : "text-muted"}`}>{n}</span>
              </Link>
            </li>
          );
        })}
      </ul>
    </section>
  );
}

/** Previous / next links over limit and offset. */
function Pager({ state, total, limit, offset }: { state: SearchState; total: number; limit: number; offset: number }) {
  if (total <= limit && offset === 0) return null;
  const page = Math.floor(offset / limit) + 1;
  const pages = Math.max(1, Math.ceil(total / limit));
  const prev = offset > 0 ? Math.max(0, offset - limit) : null;
  const next = offset + limit < total ? offset + limit : null;
  return (
    <nav aria-label="Result pages" className="mt-5 flex flex-wrap items-center gap-3 border-t border-rule pt-3">
      {prev !== null ? (
        <Link
          to={searchHref(state, { offset: prev })}
          rel="prev"
          className="rounded border-2 border-ink bg-white px-3 py-1 font-semibold text-ink no-underline hover:bg-paper"
        >
          ← Previous {limit}
        </Link>
      ) : null}
      <span className="text-muted">
        Page {page} of {pages}
      </span>
      {next !== null ? (
        <Link
          to={searchHref(state, { offset: next })}
          rel="next"
          className="rounded border-2 border-ink bg-white px-3 py-1 font-semibold text-ink no-underline hover:bg-paper"
        >
          Next {Math.min(limit, total - next)} →
        </Link>
      ) : null}
    </nav>
  );
}

/** Nothing asked yet: what one can search for, as links. */
function Examples({ examples }: { examples: string[] }) {
  return (
    <section aria-labelledby="examples-heading" className="max-w-3xl rounded-md border border-rule bg-white p-4">
      <h2 id="examples-heading" className="text-lg font-bold">
        Try one of these
      </h2>
      <ul className="mt-2 flex flex-wrap gap-2">
        {examples.map((e) => (
          <li key={e}>
            <Link
              to={searchHref({ q: e })}
              className="inline-block rounded-full border-2 border-ink px-3 py-1 font-semibold text-ink no-underline hover:bg-paper"
            >
              {e}
            </Link>
          </li>
        ))}
      </ul>
      <p className="mt-3 text-sm text-muted">
        Families, connector cards and single pins are all searched. A colour code finds the same colours written in the other notations, so <code>W/R</code> and{" "}
        <code>ws/rt</code> find the same white-with-red wires.
      </p>
    </section>
  );
}

/** No hits: why that may be, and where to go instead. */
function NoResults({ q, reduced, withoutFilters }: { q: string; reduced: boolean; withoutFilters: string | null }) {
  return (
    <section aria-labelledby="none-heading" className="max-w-3xl rounded-md border border-rule bg-white p-4" data-testid="no-results">
      <h2 id="none-heading" className="text-lg font-bold">
        Nothing in the library matches {q ? <>“{q}”</> : "these filters"}
        {withoutFilters ? " with these filters" : ""}
      </h2>
      <ul className="mt-2 list-disc space-y-1 pl-6">
        {withoutFilters ? (
          <li>
            <Link to={withoutFilters} className="font-semibold text-signal-dark underline">
              Search again without the filters
            </Link>
          </li>
        ) : null}
        <li>Check the spelling{reduced ? " — while results are reduced, a typo finds nothing" : ""}.</li>
        <li>
          Use fewer words, or the start of a word:{" "}
          <Link to={searchHref({ q: "pick" })} className="underline">
            pick
          </Link>{" "}
          finds pickup.
        </li>
        <li>
          Colour codes work in any notation:{" "}
          <Link to={searchHref({ q: "W/R" })} className="underline">
            W/R
          </Link>
          ,{" "}
          <Link to={searchHref({ q: "ws/rt" })} className="underline">
            ws/rt
          </Link>
          .
        </li>
        <li>
          Terminal numbers as printed on the part:{" "}
          <Link to={searchHref({ q: "15" })} className="underline">
            15
          </Link>
          ,{" "}
          <Link to={searchHref({ q: "31d" })} className="underline">
            31d
          </Link>
          .
        </li>
        <li>
          Or{" "}
          <Link to="/" className="underline">
            browse the library
          </Link>{" "}
          by make and family, or name a cut-off plug from its wires with the{" "}
          <Link to="/finder" className="underline">
            colour finder
          </Link>
          .
        </li>
      </ul>
    </section>
  );
}
