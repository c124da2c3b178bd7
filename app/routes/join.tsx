import { data, Form, Link, redirect } from "react-router";
import type { Route } from "./+types/join";
import { Field, FormMessage } from "~/components/field";
import { MIN_PASSWORD_CHARS } from "~/domain/passwords";
import { join } from "~/services/accounts.server";
import { optionalUser } from "~/services/guards.server";

export const meta: Route.MetaFunction = () => [{ title: "Join · Loomlore" }];

export async function loader({ request }: Route.LoaderArgs) {
  if (await optionalUser(request)) throw redirect("/garage");
  return null;
}

// Retry-After (and any other header an action sets) reaches the browser on a document request too.
export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => (actionHeaders.has("Retry-After") ? actionHeaders : loaderHeaders);

export async function action({ request, context }: Route.ActionArgs) {
  const r = await join(request, context?.ip ?? "unknown");
  if (r.ok) return { sent: r.email };
  return data({ errors: r.errors, values: r.values }, { status: r.status, headers: r.retryAfterS ? { "Retry-After": String(r.retryAfterS) } : undefined });
}

export default function JoinPage({ actionData }: Route.ComponentProps) {
  if (actionData && "sent" in actionData) {
    return (
      <section className="max-w-xl space-y-3">
        <h1 className="text-3xl font-bold">Check your inbox</h1>
        <p>
          We&apos;ve sent a message to <strong>{actionData.sent}</strong>. Follow its link to confirm the address; then you can sign in and contribute cards.
        </p>
        <p className="text-sm text-muted">
          Nothing after a few minutes? Look in the spam folder, or{" "}
          <Link to="/join" className="underline">
            try again
          </Link>
          .
        </p>
      </section>
    );
  }
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <section className="max-w-xl space-y-4">
      <h1 className="text-3xl font-bold">Join Loomlore</h1>
      <p className="text-muted">
        Anyone can read the library. An account lets you keep cards and bikes in your garage, confirm a card matches your bike, report mistakes and — once your
        address is confirmed — contribute cards.
      </p>
      <Form method="post" className="space-y-4" noValidate>
        <FormMessage error={errors.form} />
        <Field
          name="displayName"
          label="Your name (shown with your contributions)"
          value={values.displayName}
          error={errors.displayName}
          autoComplete="nickname"
          required
        />
        <Field name="email" label="E-mail address" type="email" value={values.email} error={errors.email} autoComplete="email" required />
        <Field
          name="password"
          label="Password"
          type="password"
          error={errors.password}
          autoComplete="new-password"
          required
          minLength={MIN_PASSWORD_CHARS}
          hint={`At least ${MIN_PASSWORD_CHARS} characters; a few unrelated words work well.`}
        />
        <button type="submit" className="rounded bg-signal px-5 py-2 font-semibold text-white hover:bg-signal-dark">
          Join
        </button>
      </Form>
      <p className="text-sm">
        Already have an account?{" "}
        <Link to="/login" className="font-semibold underline">
          Sign in
        </Link>
        .
      </p>
    </section>
  );
}
