import { data, Form, redirect } from "react-router";
import type { Route } from "./+types/account";
import { Field, FormMessage } from "~/components/field";
import { MIN_PASSWORD_CHARS } from "~/domain/passwords";
import { changePassword, resendVerification } from "~/services/accounts.server";
import { requireUser } from "~/services/guards.server";
import { changePasswordForm, fieldErrors, formFields } from "~/validation/accounts";
import { tooMany } from "~/services/http.server";
import { takeAction } from "~/services/rate-limit.server";

export const meta: Route.MetaFunction = () => [{ title: "Your account · Loomlore" }];

export async function loader({ request }: Route.LoaderArgs) {
  const { user } = await requireUser(request);
  return { user, changed: new URL(request.url).searchParams.get("notice") === "password" };
}

// Retry-After (and any other header an action sets) reaches the browser on a document request too.
export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => (actionHeaders.has("Retry-After") ? actionHeaders : loaderHeaders);

export async function action({ request, context }: Route.ActionArgs) {
  const { user } = await requireUser(request);
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "resend") {
    const r = await resendVerification(user, context?.ip ?? "unknown");
    return r.ok
      ? { notice: "A new confirmation link is on its way.", errors: {} as Record<string, string> }
      : data(
          { notice: "", errors: { form: "Too many requests. Try again later." } as Record<string, string> },
          { status: 429, headers: { "Retry-After": String(r.retryAfterS ?? 60) } },
        );
  }
  if (intent === "password") {
    // Before any bcrypt work: the current-password check is a guessing oracle for whoever holds the session.
    const limited = await takeAction("password-check", user.id);
    if (!limited.ok) {
      return data(
        {
          notice: "",
          errors: { form: `Too many attempts. Try again in ${Math.ceil(limited.retryAfterS / 60)} minute(s), or sign out and reset your password.` } as Record<
            string,
            string
          >,
        },
        tooMany(limited.retryAfterS),
      );
    }
    const parsed = changePasswordForm.safeParse(formFields(form));
    if (!parsed.success) return data({ notice: "", errors: fieldErrors(parsed.error.issues) }, { status: 400 });
    const r = await changePassword(request, parsed.data.current, parsed.data.password, parsed.data.signOutOthers === "on");
    if (!r.ok) return data({ notice: "", errors: r.errors }, r.status === 429 ? tooMany(r.retryAfterS ?? 2) : { status: 400 });
    // Redirect with the new session cookie: the page's loader must not run again with the old, ended session.
    throw redirect("/account?notice=password", { headers: { "Set-Cookie": r.setCookie } });
  }
  return data({ notice: "", errors: { form: "Unknown request." } as Record<string, string> }, { status: 400 });
}

export default function AccountPage({ loaderData, actionData }: Route.ComponentProps) {
  const { user } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <div className="max-w-2xl space-y-8">
      <header>
        <h1 className="text-3xl font-bold">Your account</h1>
        <p className="mt-1">
          {user.displayName} · {user.email} · <span className="font-semibold">{user.role}</span>
        </p>
      </header>
      <FormMessage error={errors.form} notice={actionData?.notice || (loaderData.changed ? "Your password is changed." : undefined)} />
      {!user.verified ? (
        <section className="rounded-md border border-rule bg-white p-4">
          <h2 className="text-xl font-bold">Confirm your address</h2>
          <p className="mt-1">Confirm {user.email} to contribute cards. The link we sent works for 48 hours.</p>
          <Form method="post" className="mt-2">
            <button name="intent" value="resend" className="rounded border-2 border-ink bg-white px-3 py-1.5 font-semibold">
              Send a new link
            </button>
          </Form>
        </section>
      ) : null}
      <section className="rounded-md border border-rule bg-white p-4">
        <h2 className="text-xl font-bold">Change your password</h2>
        <Form method="post" className="mt-3 space-y-4" noValidate>
          <input type="hidden" name="intent" value="password" />
          <Field name="current" label="Current password" type="password" error={errors.current} autoComplete="current-password" required />
          <Field
            name="password"
            label="New password"
            type="password"
            error={errors.password}
            autoComplete="new-password"
            required
            minLength={MIN_PASSWORD_CHARS}
            hint={`At least ${MIN_PASSWORD_CHARS} characters.`}
          />
          <label className="flex items-center gap-2">
            <input type="checkbox" name="signOutOthers" defaultChecked /> Sign out everywhere else
          </label>
          <button type="submit" className="rounded bg-signal px-5 py-2 font-semibold text-white hover:bg-signal-dark">
            Change password
          </button>
        </Form>
      </section>
      <Form method="post" action="/logout" reloadDocument>
        <button className="rounded border-2 border-ink bg-white px-4 py-2 font-semibold">Sign out</button>
      </Form>
    </div>
  );
}
