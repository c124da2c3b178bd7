import { data, Form, Link } from "react-router";
import type { Route } from "./+types/forgot";
import { Field, FormMessage } from "~/components/field";
import { requestReset } from "~/services/accounts.server";
import { fieldErrors, forgotForm, formFields } from "~/validation/accounts";

export const meta: Route.MetaFunction = () => [{ title: "Forgot your password · Loomlore" }];

// Retry-After (and any other header an action sets) reaches the browser on a document request too.
export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => (actionHeaders.has("Retry-After") ? actionHeaders : loaderHeaders);

export async function action({ request, context }: Route.ActionArgs) {
  const fields = formFields(await request.formData());
  const parsed = forgotForm.safeParse(fields);
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error.issues), values: { email: fields.email ?? "" }, sent: false }, { status: 400 });
  const r = await requestReset(parsed.data.email, context?.ip ?? "unknown");
  if (!r.ok)
    return data(
      { errors: { form: "Too many requests. Try again later." }, values: { email: parsed.data.email }, sent: false },
      { status: 429, headers: { "Retry-After": String(r.retryAfterS ?? 60) } },
    );
  return { errors: {} as Record<string, string>, values: { email: parsed.data.email }, sent: true };
}

export default function ForgotPage({ actionData }: Route.ComponentProps) {
  if (actionData?.sent) {
    return (
      <section className="max-w-xl space-y-3">
        <h1 className="text-3xl font-bold">Check your inbox</h1>
        <p>
          If <strong>{actionData.values.email}</strong> has a Loomlore account, a link to set a new password is on its way. It works once, for 30 minutes.
        </p>
      </section>
    );
  }
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <section className="max-w-xl space-y-4">
      <h1 className="text-3xl font-bold">Forgot your password?</h1>
      <Form method="post" className="space-y-4" noValidate>
        <FormMessage error={errors.form} />
        <Field name="email" label="E-mail address" type="email" value={actionData?.values.email} error={errors.email} autoComplete="email" required />
        <button type="submit" className="rounded bg-signal px-5 py-2 font-semibold text-white hover:bg-signal-dark">
          Send me a link
        </button>
      </Form>
      <p className="text-sm">
        <Link to="/login" className="underline">
          Back to sign in
        </Link>
      </p>
    </section>
  );
}
