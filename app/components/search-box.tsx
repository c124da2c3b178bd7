/**
 * The header's search box. Without JavaScript it is a plain GET form to /search. With it, it is a combobox (WAI-ARIA
 * APG "combobox with listbox popup"): as the rider types, it asks /api/v1/search (debounced, see `debounce` in
 * app/domain/search-ui.ts) and shows the answer in a listbox grouped by type. Only the latest request's answer is ever
 * shown: a new request aborts the one in flight, and a sequence number drops any answer that still arrives late.
 * ArrowDown/ArrowUp move the highlight, Enter opens the highlighted hit (or, with none highlighted, submits the form to
 * /search), Escape closes the list (and, pressed again, clears the box); a click opens a hit; leaving the box closes it.
 *
 * Why `fetch` and not `useFetcher`: a fetcher can load the resource route (React Router 7.18 asks for
 * /api/v1/search.data and hands over the parsed JSON), but when its request fails (offline, a dropped connection) the
 * error goes to the root error boundary and the whole page is replaced by "Something went wrong". A suggestion box on
 * every page must never do that; here a failed request only says that suggestions are unavailable.
 */
import { useEffect, useId, useRef, useState } from "react";
import { Form, useLocation, useNavigate } from "react-router";
import { debounce, enterAction, groupHits, latestOnly, moveActive, type SearchAnswer, type SearchAnswerHit } from "~/domain/search-ui";

/** Answers per request in the popup. */
export const TYPE_AHEAD_LIMIT = 8;
/** ms of quiet before a request, and the most a burst of typing delays one (QUALITY P3: ≤ 3 calls per 10 keys at 50 ms). */
export const TYPE_AHEAD_WAIT = { wait: 150, maxWait: 600 };

type Option = { key: string; href: string; hit: SearchAnswerHit | null };

const typeAheadUrl = (q: string) => `/api/v1/search?q=${encodeURIComponent(q)}&limit=${TYPE_AHEAD_LIMIT}`;
const queryOf = (search: string) => new URLSearchParams(search).get("q") ?? "";

export function SearchBox({ className = "" }: { className?: string }) {
  const id = useId();
  const listId = `${id}-list`;
  const optionId = (i: number) => `${id}-opt-${i}`;
  const location = useLocation();
  const navigate = useNavigate();

  const [text, setText] = useState(() => (location.pathname === "/search" ? queryOf(location.search) : ""));
  const [open, setOpen] = useState(false);
  const [active, setActive] = useState(-1);
  const [answer, setAnswer] = useState<{ q: string; data: SearchAnswer } | null>(null);
  const [loading, setLoading] = useState(false);
  const [failed, setFailed] = useState(false);

  // The words of the latest request, its ticket and its abort handle.
  const requested = useRef<string | null>(null);
  const inFlight = useRef<AbortController | null>(null);
  const [tickets] = useState(latestOnly);
  const [debounced] = useState(() => debounce<string>((q) => void ask(q), TYPE_AHEAD_WAIT));

  async function ask(q: string) {
    inFlight.current?.abort();
    const controller = new AbortController();
    inFlight.current = controller;
    const ticket = tickets.begin();
    requested.current = q;
    setLoading(true);
    setFailed(false);
    try {
      const res = await fetch(typeAheadUrl(q), { signal: controller.signal, headers: { Accept: "application/json" } });
      const body = res.ok ? ((await res.json()) as SearchAnswer) : null;
      if (!tickets.isLatest(ticket)) return; // a newer request is out: this answer is stale
      if (body) {
        setAnswer({ q, data: body });
        setActive(-1);
      }
      setFailed(!body);
    } catch {
      if (tickets.isLatest(ticket)) setFailed(true); // an abort always comes with a newer ticket, so this is a real failure
    } finally {
      if (tickets.isLatest(ticket)) setLoading(false);
    }
  }

  /** Forget what is pending or in flight (the box was emptied, the page changed). */
  const stop = () => {
    debounced.cancel();
    tickets.drop();
    inFlight.current?.abort();
    inFlight.current = null;
    requested.current = null;
    setLoading(false);
  };
  // `stop`, `ask` and the debounce use only refs, state setters and objects made once: the first render's are good.
  useEffect(() => () => stop(), []);

  // A navigation closes the list; on /search the box shows the page's words, elsewhere it starts empty.
  useEffect(() => {
    stop();
    setOpen(false);
    setActive(-1);
    setText(location.pathname === "/search" ? queryOf(location.search) : "");
  }, [location.key, location.pathname, location.search]);

  // Keep the highlighted option in view inside the scrolling popup.
  useEffect(() => {
    if (active >= 0) document.getElementById(optionId(active))?.scrollIntoView({ block: "nearest" });
  }, [active]); // optionId depends only on the stable useId

  const q = text.trim();
  // After a failed request the last answer is for other words: show none.
  const current = failed ? null : answer;
  const groups = current ? groupHits(current.data.hits) : [];
  const options: Option[] = [
    ...groups.flatMap((g) => g.hits.map((hit) => ({ key: `${hit.type}:${hit.url}`, href: hit.url, hit }))),
    ...(q ? [{ key: "all", href: `/search?q=${encodeURIComponent(q)}`, hit: null }] : []),
  ];
  const shown = open && q !== "" && (answer !== null || failed);

  const onChange = (value: string) => {
    setText(value);
    setActive(-1);
    const words = value.trim();
    if (!words) {
      stop();
      setOpen(false);
      return;
    }
    setOpen(true);
    if (words === requested.current && !failed) debounced.cancel();
    else debounced.call(words);
  };

  const choose = (o: Option) => {
    stop();
    setOpen(false);
    setActive(-1);
    navigate(o.href);
  };

  const onKeyDown = (e: React.KeyboardEvent<HTMLInputElement>) => {
    if (e.key === "ArrowDown" || e.key === "ArrowUp") {
      if (!q || (!answer && !failed)) return;
      e.preventDefault();
      if (!open) {
        setOpen(true);
        setActive(e.key === "ArrowDown" ? 0 : options.length - 1);
        return;
      }
      setActive((a) => moveActive(a, options.length, e.key));
    } else if (e.key === "Enter") {
      const act = enterAction(shown ? active : -1, options.length);
      if (act.kind === "open") {
        e.preventDefault();
        choose(options[act.index]);
      }
      // otherwise the form submits: the full results page
    } else if (e.key === "Escape") {
      if (shown) {
        e.preventDefault();
        setOpen(false);
        setActive(-1);
      } else if (text) {
        e.preventDefault();
        onChange("");
      }
    }
  };

  let n = -1;
  return (
    <Form
      method="get"
      action="/search"
      role="search"
      aria-label="Search the library"
      className={`relative flex min-w-0 items-stretch ${className}`}
      onSubmit={() => {
        stop();
        setOpen(false);
        setActive(-1);
      }}
    >
      <label htmlFor={`${id}-q`} className="sr-only">
        Search the library
      </label>
      <input
        id={`${id}-q`}
        name="q"
        type="search"
        value={text}
        maxLength={200}
        autoComplete="off"
        spellCheck={false}
        enterKeyHint="search"
        placeholder="Family, circuit, colour code, terminal…"
        role="combobox"
        aria-autocomplete="list"
        aria-expanded={shown}
        aria-controls={listId}
        aria-activedescendant={shown && active >= 0 ? optionId(active) : undefined}
        onChange={(e) => onChange(e.target.value)}
        onKeyDown={onKeyDown}
        onFocus={() => {
          if (q && (answer || failed)) setOpen(true);
        }}
        onBlur={() => {
          setOpen(false);
          setActive(-1);
        }}
        className="min-w-0 flex-1 rounded-l border-2 border-r-0 border-paper bg-white px-2 py-1 text-base text-ink placeholder:text-muted/80"
      />
      <button type="submit" className="rounded-r border-2 border-paper bg-paper px-3 py-1 text-sm font-semibold text-ink hover:bg-white">
        Search
      </button>

      <div
        hidden={!shown}
        data-testid="type-ahead"
        className="absolute top-full right-0 left-0 z-50 mt-1 max-h-[70vh] overflow-y-auto rounded-md border-2 border-ink bg-white text-ink shadow-lg lg:left-auto lg:w-[30rem]"
      >
        {current?.data.source === "database" ? (
          <p className="border-b border-caution-edge bg-caution px-3 py-1.5 text-xs" data-testid="type-ahead-reduced">
            <strong>Reduced results:</strong> the search service is not answering, so typos are not forgiven and words match only from their start.
          </p>
        ) : null}
        {failed ? (
          <p className="border-b border-rule px-3 py-2 text-sm" data-testid="type-ahead-failed">
            Suggestions are not available just now. Press Enter to open the full results page.
          </p>
        ) : null}
        {current && current.data.hits.length === 0 ? <p className="px-3 py-2 text-sm text-muted">Nothing in the library matches “{current.q}”.</p> : null}
        <div role="listbox" id={listId} aria-label="Search suggestions" data-query={current?.q ?? ""} aria-busy={loading}>
          {groups.map((g) => (
            <div role="group" key={g.type} aria-labelledby={`${id}-g-${g.type}`}>
              <div role="presentation" id={`${id}-g-${g.type}`} className="bg-paper px-3 pt-1.5 pb-0.5 text-xs font-bold tracking-wide text-muted uppercase">
                {g.label}
              </div>
              {g.hits.map((hit) => {
                const i = ++n;
                return (
                  <div
                    key={`${hit.type}:${hit.url}`}
                    id={optionId(i)}
                    role="option"
                    aria-selected={i === active}
                    data-type={hit.type}
                    data-href={hit.url}
                    onMouseDown={(e) => e.preventDefault()}
                    onClick={() => choose(options[i])}
                    onMouseMove={() => {
                      if (active !== i) setActive(i);
                    }}
                    className={`cursor-pointer border-l-4 px-3 py-1.5 ${i === active ? "border-signal bg-caution/60" : "border-transparent"}`}
                  >
                    <span className="block truncate font-semibold">{hit.title}</span>
                    <span className="block truncate text-sm text-muted">
                      {hit.subtitle}
                      {hit.type === "pin" ? ` — ${hit.family}` : ""}
                    </span>
                  </div>
                );
              })}
            </div>
          ))}
          {q
            ? (() => {
                const i = options.length - 1;
                return (
                  <div
                    id={optionId(i)}
                    role="option"
                    aria-selected={i === active}
                    data-type="all"
                    data-href={options[i].href}
                    onMouseDown={(e) => e.preventDefault()}
                    onClick={() => choose(options[i])}
                    onMouseMove={() => {
                      if (active !== i) setActive(i);
                    }}
                    className={`sticky bottom-0 cursor-pointer border-t border-l-4 border-rule px-3 py-2 font-semibold text-signal-dark ${i === active ? "border-l-signal bg-caution" : "border-l-transparent bg-white"}`}
                  >
                    All results for “{q}”{current?.q === q ? <span className="font-normal text-muted"> ({current.data.total} in the library)</span> : null}
                  </div>
                );
              })()
            : null}
        </div>
      </div>
      <p role="status" className="sr-only">
        {!shown
          ? ""
          : failed
            ? "Suggestions are not available just now."
            : current && current.data.hits.length
              ? `${current.data.hits.length} suggestions for “${current.q}”; arrow keys to choose.`
              : current
                ? `No suggestions for “${current.q}”.`
                : ""}
      </p>
    </Form>
  );
}
