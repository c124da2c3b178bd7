import { data, Form, Link, redirect } from "react-router";
import type { Route } from "./+types/login";
import { Field, FormMessage } from "~/components/field";
import { nextTarget } from "~/domain/redirects";
import { appUrl, signIn } from "~/services/accounts.server";
import { optionalUser } from "~/services/guards.server";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Loomlore" }];

/** The `next` of this request, checked before anything else: a control or space character in it is a 400. */
function nextOf(request: Request): string {
  const n = nextTarget(new URL(request.url).searchParams.get("next"), appUrl());
  if (!n.ok) throw data(`This sign-in link is not valid. ${n.reason}`, { status: 400 });
  return n.to;
}

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const next = nextOf(request);
  if (await optionalUser(request)) throw redirect(next);
  return { next: url.searchParams.get("next") ? next : "", notice: url.searchParams.get("notice") };
}

// Retry-After (and any other header an action sets) reaches the browser on a document request too.
export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => (actionHeaders.has("Retry-After") ? actionHeaders : loaderHeaders);

export async function action({ request, context }: Route.ActionArgs) {
  const next = nextOf(request);
  const r = await signIn(request, context?.ip ?? "unknown");
  if (r.ok) throw redirect(next, { headers: { "Set-Cookie": r.setCookie } });
  return data({ errors: r.errors, values: r.values }, { status: r.status, headers: r.retryAfterS ? { "Retry-After": String(r.retryAfterS) } : undefined });
}

const NOTICES: Record<string, string> = {
  reset: "Your password is changed. Sign in with the new one.",
  "signed-out": "You are signed out.",
  verified: "Your address is confirmed. Sign in to carry on.",
};

export default function LoginPage({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  const { next, notice } = loaderData;
  return (
    <section className="max-w-xl space-y-4">
      <h1 className="text-3xl font-bold">Sign in</h1>
      <Form method="post" action={`/login${next ? `?next=${encodeURIComponent(next)}` : ""}`} className="space-y-4" noValidate>
        <FormMessage error={errors.form} notice={notice ? NOTICES[notice] : undefined} />
        <Field name="email" label="E-mail address" type="email" value={values.email} error={errors.email} autoComplete="email" required />
        <Field name="password" label="Password" type="password" error={errors.password} autoComplete="current-password" required />
        <button type="submit" className="rounded bg-signal px-5 py-2 font-semibold text-white hover:bg-signal-dark">
          Sign in
        </button>
      </Form>
      <p className="text-sm">
        <Link to="/forgot" className="underline">
          Forgot your password?
        </Link>{" "}
        · New here?{" "}
        <Link to="/join" className="font-semibold underline">
          Join
        </Link>
        .
      </p>
    </section>
  );
}
