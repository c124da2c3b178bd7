import { data, Form, redirect } from "react-router";
import type { Route } from "./+types/reset";
import { Field, FormMessage } from "~/components/field";
import { MIN_PASSWORD_CHARS } from "~/domain/passwords";
import { resetPassword } from "~/services/accounts.server";
import { fieldErrors, formFields, resetForm } from "~/validation/accounts";

export const meta: Route.MetaFunction = () => [{ title: "Set a new password · Loomlore" }];

export function loader({ request }: Route.LoaderArgs) {
  return { token: new URL(request.url).searchParams.get("token") ?? "" };
}

// Retry-After (and any other header an action sets) reaches the browser on a document request too.
export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => (actionHeaders.has("Retry-After") ? actionHeaders : loaderHeaders);

export async function action({ request, context }: Route.ActionArgs) {
  const parsed = resetForm.safeParse(formFields(await request.formData()));
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error.issues) }, { status: 400 });
  const r = await resetPassword(parsed.data.token, parsed.data.password, context?.ip ?? "unknown");
  if (!r.ok) {
    return data(
      { errors: { [r.field ?? "form"]: r.error } as Record<string, string> },
      { status: r.status ?? 400, headers: r.retryAfterS ? { "Retry-After": String(r.retryAfterS) } : undefined },
    );
  }
  throw redirect("/login?notice=reset");
}

export default function ResetPage({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <section className="max-w-xl space-y-4">
      <h1 className="text-3xl font-bold">Set a new password</h1>
      <Form method="post" className="space-y-4" noValidate>
        <FormMessage error={errors.form ?? errors.token} />
        <input type="hidden" name="token" value={loaderData.token} />
        <Field
          name="password"
          label="New password"
          type="password"
          error={errors.password}
          autoComplete="new-password"
          required
          minLength={MIN_PASSWORD_CHARS}
          hint={`At least ${MIN_PASSWORD_CHARS} characters. Every device signed in to this account will be signed out.`}
        />
        <button type="submit" className="rounded bg-signal px-5 py-2 font-semibold text-white hover:bg-signal-dark">
          Set password
        </button>
      </Form>
    </section>
  );
}
