import { Link, useLocation } from "react-router";

/**
 * What the error page says for each status the app answers with, in the site's own words, and the next step. A thrown
 * message (a plain string, e.g. "Confirm your e-mail address first …") is shown as given; the title and the next step
 * come from the status. Anything unexpected (5xx) shows the request's error id to quote.
 */
interface Wording {
  title: string;
  text: string;
  next: (here: string) => { to: string; label: string };
}

const HOME = () => ({ to: "/", label: "Back to the library" });
const WORDS: Record<number, Wording> = {
  400: { title: "That could not be read", text: "Something in the request was not what this page expects.", next: HOME },
  401: {
    title: "Sign in first",
    text: "This page is for signed-in members.",
    next: (here) => ({ to: `/login?next=${encodeURIComponent(here)}`, label: "Sign in" }),
  },
  403: { title: "Not open to you yet", text: "Your account cannot do this.", next: () => ({ to: "/account", label: "See your account" }) },
  404: { title: "Nothing here", text: "This page is not in the library.", next: HOME },
  405: { title: "Not something this page does", text: "This address does not take that kind of request.", next: HOME },
  409: {
    title: "Changed meanwhile",
    text: "Someone changed this while you had it open. Reload to see the current version, then make your change again.",
    next: (here) => ({ to: here, label: "Reload the page" }),
  },
  413: { title: "Too large", text: "What was sent is larger than this page accepts. Send less at a time (photos one by one, a shorter paste).", next: HOME },
  429: {
    title: "Too many at once",
    text: "That was tried too often just now. Wait a minute, then try again.",
    next: (here) => ({ to: here, label: "Try again" }),
  },
};

export function errorWording(status: number): Wording | null {
  return WORDS[status] ?? null;
}

export function ErrorPage({ status, detail, requestId }: { status: number; detail: string | null; requestId: string | null }) {
  const location = useLocation();
  const here = location.pathname + location.search;
  const words = errorWording(status);
  if (!words || status >= 500) {
    return (
      <section className="max-w-2xl" data-status={status}>
        <title>Something went wrong · Loomlore</title>
        <h1 className="text-3xl font-bold">Something went wrong</h1>
        <p className="mt-3 text-lg">The page could not be shown. Try again in a moment; if it keeps happening, tell us what you were doing.</p>
        {requestId ? (
          <p className="mt-3 text-muted" data-testid="error-id">
            Error id <code>{requestId}</code> — please quote it if you tell us.
          </p>
        ) : null}
        <p className="mt-4">
          <Link to="/" className="font-semibold text-signal-dark">
            Back to the library
          </Link>
        </p>
      </section>
    );
  }
  const next = words.next(here);
  const confirm = status === 403 && /confirm your e-mail/i.test(detail ?? "");
  return (
    <section className="max-w-2xl" data-status={status}>
      <title>{`${words.title} · Loomlore`}</title>
      <h1 className="text-3xl font-bold">{words.title}</h1>
      <p className="mt-3 text-lg">{detail || words.text}</p>
      <p className="mt-4">
        <Link to={confirm ? "/account" : next.to} className="font-semibold text-signal-dark">
          {confirm ? "Confirm your address from your account page" : next.label}
        </Link>
        {next.to !== "/" ? (
          <>
            {" "}
            or go{" "}
            <Link to="/" className="font-semibold text-signal-dark">
              back to the library
            </Link>
            .
          </>
        ) : status === 404 ? (
          <>
            {" "}
            or look up a code in the{" "}
            <Link to="/colours" className="font-semibold text-signal-dark">
              colour codes
            </Link>
            .
          </>
        ) : null}
      </p>
    </section>
  );
}
