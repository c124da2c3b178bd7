import { Form, isRouteErrorResponse, Link, Links, Meta, NavLink, Outlet, Scripts, ScrollRestoration, useRouteLoaderData } from "react-router";
import type { Route } from "./+types/root";
import "@fontsource/source-sans-3/400.css";
import "@fontsource/source-sans-3/600.css";
import "@fontsource/source-sans-3/700.css";
import "./app.css";

import { ErrorPage } from "~/components/error-page";
import { SearchBox } from "~/components/search-box";
import { can } from "~/domain/roles";
import { optionalUser } from "~/services/guards.server";

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

/** Who is signed in, for the header (every page), and this request's id for the error page. */
export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await optionalUser(request);
  return { user: user ? { displayName: user.displayName, role: user.role } : null, requestId: context.requestId ?? null };
}

// Runs with every navigation (a session read), so the error page's id is always the failing request's own.
export const shouldRevalidate = () => true;

const nav = [
  { to: "/", label: "Library", end: true },
  { to: "/finder", label: "Colour finder", end: false },
  { to: "/bench", label: "Bench sheet", end: false },
  { to: "/planner", label: "Loom planner", end: false },
  { to: "/colours", label: "Colour codes", end: false },
];

/** The page frame: header with the wordmark and the main sections, content, footer. */
export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen font-sans antialiased">
        <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:bg-white focus:p-2">
          Skip to content
        </a>
        <header className="no-print border-b-4 border-ink bg-ink text-paper">
          <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
            <Link to="/" className="flex items-center gap-2 text-xl font-bold tracking-tight text-paper no-underline">
              <svg aria-hidden="true" width="26" height="26" viewBox="0 0 26 26">
                <rect x="2" y="6" width="22" height="14" rx="3" fill="none" stroke="currentColor" strokeWidth="2.5" />
                <circle cx="9" cy="13" r="2.6" fill="#e0a43a" />
                <circle cx="17" cy="13" r="2.6" fill="#5aa6d6" />
              </svg>
              Loomlore
            </Link>
            <nav aria-label="Main" className="flex gap-4 text-base">
              {nav.map((n) => (
                <NavLink
                  key={n.to}
                  to={n.to}
                  end={n.end}
                  className={({ isActive }) => `no-underline hover:underline ${isActive ? "font-semibold text-white underline decoration-2" : "text-paper/85"}`}
                >
                  {n.label}
                </NavLink>
              ))}
            </nav>
            <SearchBox className="order-last w-full md:order-none md:w-auto md:max-w-md md:flex-1 md:basis-64" />
            <AccountLinks />
          </div>
        </header>
        <main id="main" className="mx-auto max-w-6xl px-4 py-6">
          {children}
        </main>
        <footer className="no-print mx-auto max-w-6xl border-t border-rule px-4 py-6 text-sm text-muted">
          Loomlore is a community library. Check every card against your own bike and the factory service manual; when in doubt, ask a qualified mechanic. All
          makes and families shown in this demo are invented.
        </footer>
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

/** Sign in / join, or the rider's garage, admin (for admins) and sign out. */
function AccountLinks() {
  const data = useRouteLoaderData<typeof loader>("root");
  const user = data?.user ?? null;
  if (!user) {
    return (
      <div className="ml-auto flex gap-3 text-sm">
        <Link to="/login" className="text-paper underline">
          Sign in
        </Link>
        <Link to="/join" className="rounded bg-paper px-2 py-0.5 font-semibold text-ink no-underline">
          Join
        </Link>
      </div>
    );
  }
  return (
    <div className="ml-auto flex flex-wrap items-center gap-3 text-sm">
      <Link to="/garage" className="text-paper underline">
        Garage
      </Link>
      {can(user.role, "submission.create") ? (
        <Link to="/contribute" className="text-paper underline">
          Contribute
        </Link>
      ) : null}
      {can(user.role, "review.work") ? (
        <Link to="/review" className="text-paper underline">
          Review queue
        </Link>
      ) : null}
      {can(user.role, "admin.roles") ? (
        <Link to="/admin" className="text-paper underline">
          Admin
        </Link>
      ) : null}
      <Link to="/account" className="text-paper/85 no-underline hover:underline" data-testid="signed-in-as">
        {user.displayName}
      </Link>
      <Form method="post" action="/logout" reloadDocument>
        <button className="rounded border border-paper/60 px-2 py-0.5 text-paper">Sign out</button>
      </Form>
    </div>
  );
}

export default function App() {
  return <Outlet />;
}

/** One boundary for the unexpected: a real 404 page, and a plain apology with an id for anything else. */
export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const root = useRouteLoaderData<typeof loader>("root");
  const status = isRouteErrorResponse(error) ? error.status : 500;
  if (!isRouteErrorResponse(error)) console.error(error);
  // A thrown message (a string) is the site's own words for this case; anything else is not shown.
  const detail = isRouteErrorResponse(error) && typeof error.data === "string" && error.data && status < 500 ? error.data : null;
  return <ErrorPage status={status} detail={detail} requestId={status >= 500 ? (root?.requestId ?? null) : null} />;
}
