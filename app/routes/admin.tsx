import { data, Form } from "react-router";
import type { Route } from "./+types/admin";
import { FormMessage } from "~/components/field";
import { REDACTED } from "~/domain/mail-templates";
import { ROLES } from "~/domain/roles";
import { createMake, listAudit, listLibrary, listOutbox, listUsers, revokeUser, setRole, updateFamily } from "~/services/admin.server";
import { familyForm, fieldErrors, formFields, makeForm } from "~/validation/accounts";
import { requireCan } from "~/services/guards.server";
import { capturedMail } from "~/services/mail-standin.server";

export const meta: Route.MetaFunction = () => [{ title: "Admin · Loomlore" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireCan(request, "admin.roles");
  const [users, auditLog, outbox, captured, library] = await Promise.all([listUsers(), listAudit(60), listOutbox(40), capturedMail(20), listLibrary()]);
  return { users, auditLog, outbox, captured, library };
}

export async function action({ request }: Route.ActionArgs) {
  const { user } = await requireCan(request, "admin.roles");
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "make" || intent === "family") {
    await requireCan(request, "admin.library");
    const parsed = (intent === "make" ? makeForm : familyForm).safeParse(formFields(form));
    if (!parsed.success) return data({ error: Object.values(fieldErrors(parsed.error.issues))[0] ?? "Check the form.", notice: "" }, { status: 400 });
    const r =
      intent === "make"
        ? await createMake(user.id, parsed.data as { slug: string; name: string; colourSystem: string; blurb: string })
        : await updateFamily(user.id, parsed.data.slug, parsed.data as { name: string; modelRange: string; yearFrom: number; yearTo: number });
    return r.ok ? { error: "", notice: intent === "make" ? "Make added." : "Family updated." } : data({ error: r.error, notice: "" }, { status: 400 });
  }
  const userId = Number(form.get("userId"));
  if (!Number.isInteger(userId)) return data({ error: "Choose an account.", notice: "" }, { status: 400 });
  if (form.get("intent") === "role") {
    const r = await setRole(user.id, userId, String(form.get("role") ?? ""));
    return r.ok ? { error: "", notice: "Role changed." } : data({ error: r.error, notice: "" }, { status: 400 });
  }
  if (form.get("intent") === "revoke") {
    await revokeUser(user.id, userId);
    return { error: "", notice: "Signed out everywhere." };
  }
  return data({ error: "Unknown request.", notice: "" }, { status: 400 });
}

export default function AdminPage({ loaderData, actionData }: Route.ComponentProps) {
  const { users, auditLog, outbox, captured, library } = loaderData;
  return (
    <div className="space-y-8">
      <h1 className="text-3xl font-bold">Admin</h1>
      <FormMessage error={actionData?.error || undefined} notice={actionData?.notice || undefined} />
      <section aria-labelledby="users">
        <h2 id="users" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Accounts and roles
        </h2>
        <div className="relative overflow-x-auto">
          <table className="mt-2 w-full border-collapse bg-white text-left text-sm">
            <thead className="border-b-2 border-ink">
              <tr>
                <th className="p-2">Name</th>
                <th className="p-2">E-mail</th>
                <th className="p-2">Confirmed</th>
                <th className="p-2">Role</th>
                <th className="p-2">Sessions</th>
              </tr>
            </thead>
            <tbody>
              {users.map((u) => (
                <tr key={u.id} className="border-b border-rule" data-user={u.email}>
                  <td className="p-2">{u.displayName}</td>
                  <td className="p-2">{u.email}</td>
                  <td className="p-2">{u.verified ? "yes" : "no"}</td>
                  <td className="p-2">
                    <Form method="post" className="flex gap-2">
                      <input type="hidden" name="userId" value={u.id} />
                      <select
                        name="role"
                        defaultValue={u.role}
                        aria-label={`Role of ${u.displayName}`}
                        className="rounded border border-ink bg-white px-1 py-0.5"
                      >
                        {ROLES.map((r) => (
                          <option key={r}>{r}</option>
                        ))}
                      </select>
                      <button name="intent" value="role" className="rounded border border-ink px-2 py-0.5 font-semibold">
                        Save
                      </button>
                    </Form>
                  </td>
                  <td className="p-2">
                    <Form method="post">
                      <input type="hidden" name="userId" value={u.id} />
                      <button name="intent" value="revoke" className="underline">
                        Sign out everywhere
                      </button>
                    </Form>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
      <section aria-labelledby="library">
        <h2 id="library" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Makes and families
        </h2>
        <div className="mt-2 space-y-2">
          {library.families.map((f) => (
            <Form key={f.slug} method="post" className="flex flex-wrap items-end gap-2 text-sm" aria-label={`Edit ${f.name}`}>
              <input type="hidden" name="intent" value="family" />
              <input type="hidden" name="slug" value={f.slug} />
              <label>
                Name
                <input name="name" defaultValue={f.name} className="ml-1 w-40 rounded border border-ink px-1" />
              </label>
              <label>
                Models
                <input name="modelRange" defaultValue={f.modelRange} className="ml-1 w-56 rounded border border-ink px-1" />
              </label>
              <label>
                From
                <input name="yearFrom" defaultValue={f.yearFrom} inputMode="numeric" className="ml-1 w-16 rounded border border-ink px-1" />
              </label>
              <label>
                To
                <input name="yearTo" defaultValue={f.yearTo} inputMode="numeric" className="ml-1 w-16 rounded border border-ink px-1" />
              </label>
              <button className="rounded border border-ink px-2 font-semibold">Save</button>
            </Form>
          ))}
        </div>
        <Form method="post" className="mt-4 flex flex-wrap items-end gap-2 text-sm" aria-label="Add a make">
          <input type="hidden" name="intent" value="make" />
          <label>
            Slug
            <input name="slug" className="ml-1 w-32 rounded border border-ink px-1" />
          </label>
          <label>
            Name
            <input name="name" className="ml-1 w-48 rounded border border-ink px-1" />
          </label>
          <label>
            Colours written in
            <select name="colourSystem" className="ml-1 rounded border border-ink bg-white">
              {["jis", "din", "bs", "en", "iec"].map((c) => (
                <option key={c}>{c}</option>
              ))}
            </select>
          </label>
          <button className="rounded bg-ink px-2 py-0.5 font-semibold text-paper">Add make</button>
        </Form>
        <p className="mt-1 text-xs text-muted">
          {library.makes.length} makes: {library.makes.map((m) => m.name).join(", ")}.
        </p>
      </section>

      <section aria-labelledby="outbox">
        <h2 id="outbox" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Mail outbox
        </h2>
        <ul className="mt-2 space-y-1 text-sm">
          {outbox.map((m) => (
            <li key={m.id}>
              <span className="font-semibold">{m.status}</span> · {m.kind} · {m.to} · {m.subject} · attempts {m.attempts}
              {m.lastError ? ` · ${m.lastError}` : ""}
            </li>
          ))}
        </ul>
      </section>
      <section aria-labelledby="captured">
        <h2 id="captured" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Captured by the local mail stand-in
        </h2>
        {captured.ok ? (
          <ul className="mt-2 space-y-3">
            {captured.messages.map((m) => (
              <li key={m.id} className="rounded border border-rule bg-white p-3 text-sm">
                <p className="font-semibold">{m.subject}</p>
                <p className="text-muted">
                  to {m.to} · {m.receivedAt}
                </p>
                <pre className="mt-1 font-sans whitespace-pre-wrap">{linkify(m.text)}</pre>
              </li>
            ))}
          </ul>
        ) : (
          <p className="mt-2 text-muted">The mail stand-in is not reachable ({captured.error}); with a real relay, messages are in its own logs.</p>
        )}
      </section>
      <section aria-labelledby="audit">
        <h2 id="audit" className="border-b-2 border-ink pb-1 text-xl font-bold">
          Audit log
        </h2>
        <ul className="mt-2 space-y-1 text-sm">
          {auditLog.map((a) => (
            <li key={a.id}>
              {a.at.slice(0, 19).replace("T", " ")} · {a.actor} · {a.action} · {a.subject} {a.detail !== "{}" ? `· ${a.detail}` : ""}
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}

/**
 * Plain-text mail with its links clickable (text is React-escaped; only http(s) links become anchors). The text comes
 * with its single-use tokens already redacted (capturedMail); a redacted link stays plain text.
 */
function linkify(text: string) {
  return text.split(/(https?:\/\/[^\s<>"]+)/g).map((part, i) =>
    /^https?:\/\//.test(part) && !part.includes(REDACTED) ? (
      <a key={i} href={part} className="text-signal-dark underline">
        {part}
      </a>
    ) : (
      part
    ),
  );
}
