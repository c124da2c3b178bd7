import { data, Form, Link } from "react-router";
import type { Route } from "./+types/garage";
import { FormMessage } from "~/components/field";
import { addBike, listGarage, removeItem } from "~/services/garage.server";
import { requireCan } from "~/services/guards.server";
import { listFamilies } from "~/services/library.server";
import { tooMany } from "~/services/http.server";
import { takeAction } from "~/services/rate-limit.server";
import { answered, fieldErrors, formFields, refusal } from "~/validation/forms";
import { garageForm } from "~/validation/garage";

export const meta: Route.MetaFunction = () => [{ title: "Your garage · Loomlore" }];

export async function loader({ request }: Route.LoaderArgs) {
  const { user } = await requireCan(request, "garage.save");
  const [garage, { families }] = await Promise.all([listGarage(user.id), listFamilies({ limit: 100, offset: 0 })]);
  return { user, garage, families };
}

// Retry-After (and any other header an action sets) reaches the browser on a document request too.
export const headers: Route.HeadersFunction = ({ actionHeaders, loaderHeaders }) => (actionHeaders.has("Retry-After") ? actionHeaders : loaderHeaders);

export async function action({ request }: Route.ActionArgs) {
  const { user } = await requireCan(request, "garage.save");
  const fields = formFields(await request.formData());
  const parsed = garageForm.safeParse(fields);
  if (!parsed.success) {
    const { intent, ...errors } = fieldErrors(parsed.error.issues);
    return data(refusal(intent ? { form: intent } : errors, fields), { status: 400 }); // an unknown intent is the form's problem
  }
  const f = parsed.data;
  if (f.intent === "remove") {
    await removeItem(user.id, f.id);
    return answered("");
  }
  const values = { family: f.family, year: fields.year ?? "", label: f.label };
  const limited = await takeAction("garage-add", user.id);
  if (!limited.ok)
    return data(
      refusal({ form: `You have added many bikes this hour. Try again in ${Math.ceil(limited.retryAfterS / 60)} minute(s).` }, values),
      tooMany(limited.retryAfterS),
    );
  const r = await addBike(user.id, f.family, f.year, f.label);
  if (!r.ok) return data(refusal({ [r.field]: r.error }, values), { status: 400 });
  return answered("");
}

export default function GaragePage({ loaderData, actionData }: Route.ComponentProps) {
  const { user, garage, families } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <div className="space-y-8">
      <header>
        <h1 className="text-3xl font-bold">{user.displayName}&apos;s garage</h1>
      </header>
      <FormMessage error={errors.form} />
      <section aria-labelledby="bikes">
        <h2 id="bikes" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Bikes
        </h2>
        {garage.bikes.length ? (
          <ul className="mt-2 divide-y divide-rule rounded-md border border-rule bg-white">
            {garage.bikes.map((b) => (
              <li key={b.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2">
                <span>
                  <Link to={`/families/${b.family.slug}`} className="font-semibold text-signal-dark underline">
                    {b.family.name}
                  </Link>
                  {b.year ? `, ${b.year}` : ""}
                  {b.label ? ` — ${b.label}` : ""}
                </span>
                <Form method="post">
                  <input type="hidden" name="id" value={b.id} />
                  <button name="intent" value="remove" className="text-sm underline">
                    Remove
                  </button>
                </Form>
              </li>
            ))}
          </ul>
        ) : (
          <p className="mt-2 text-muted">No bikes yet.</p>
        )}
        <Form method="post" className="mt-3 flex flex-wrap items-end gap-3 rounded-md border border-rule bg-white p-3" noValidate>
          <input type="hidden" name="intent" value="bike" />
          <label className="text-sm font-semibold">
            Family
            <select
              name="family"
              defaultValue={values.family ?? ""}
              aria-invalid={errors.family ? true : undefined}
              className="mt-1 block max-w-[80vw] rounded border-2 border-ink bg-white px-2 py-1.5 font-normal"
            >
              <option value="">choose…</option>
              {families.map((f) => (
                <option key={f.slug} value={f.slug}>
                  {f.make.name} {f.name} ({f.yearFrom}–{f.yearTo})
                </option>
              ))}
            </select>
            {errors.family ? <span className="block text-sm text-signal-dark">{errors.family}</span> : null}
          </label>
          <label className="text-sm font-semibold">
            Year
            <input
              name="year"
              inputMode="numeric"
              defaultValue={values.year ?? ""}
              aria-invalid={errors.year ? true : undefined}
              className="mt-1 block w-24 rounded border-2 border-ink px-2 py-1.5 font-normal"
            />
            {errors.year ? <span className="block text-sm text-signal-dark">{errors.year}</span> : null}
          </label>
          <label className="text-sm font-semibold">
            Note (optional)
            <input
              name="label"
              defaultValue={values.label ?? ""}
              maxLength={80}
              className="mt-1 block w-56 rounded border-2 border-ink px-2 py-1.5 font-normal"
              placeholder="e.g. the cafe project"
            />
          </label>
          <button type="submit" className="rounded bg-ink px-4 py-2 font-semibold text-paper">
            Add bike
          </button>
        </Form>
      </section>
      <section aria-labelledby="cards">
        <h2 id="cards" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Saved cards
        </h2>
        {garage.cards.length ? (
          <ul className="mt-2 divide-y divide-rule rounded-md border border-rule bg-white">
            {garage.cards.map((c) => (
              <li key={c.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2">
                <span>
                  <Link to={`/connectors/${c.slug}`} className="font-semibold text-signal-dark underline">
                    {c.name}
                  </Link>{" "}
                  <span className="text-sm text-muted">{c.family.name}</span>
                </span>
                <Form method="post">
                  <input type="hidden" name="id" value={c.id} />
                  <button name="intent" value="remove" className="text-sm underline">
                    Remove
                  </button>
                </Form>
              </li>
            ))}
          </ul>
        ) : (
          <p className="mt-2 text-muted">No saved cards yet: open a card and press “Save to my garage”.</p>
        )}
      </section>
    </div>
  );
}
