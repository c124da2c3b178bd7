import { data, Form, Link } from "react-router";
import type { Route } from "./+types/verify";
import { verifyAddress } from "~/services/accounts.server";
import { optionalUser } from "~/services/guards.server";

export const meta: Route.MetaFunction = () => [{ title: "Confirm your address · Loomlore" }];

// The link in the mail only opens this page; confirming is a POST. Mail scanners that fetch every link
// would otherwise use up the single-use token, and a GET should never change anything.
export function loader({ request }: Route.LoaderArgs) {
  return { token: new URL(request.url).searchParams.get("token") ?? "" };
}

export async function action({ request }: Route.ActionArgs) {
  const token = String((await request.formData()).get("token") ?? "");
  const r = await verifyAddress(token);
  return data({ ok: r.ok, signedIn: Boolean(await optionalUser(request)) }, { status: r.ok ? 200 : 400 });
}

export default function VerifyPage({ loaderData, actionData }: Route.ComponentProps) {
  if (!actionData) {
    return (
      <section className="max-w-xl space-y-3">
        <h1 className="text-3xl font-bold">Confirm your address</h1>
        <p>Press the button to confirm this e-mail address for your Loomlore account.</p>
        <Form method="post">
          <input type="hidden" name="token" value={loaderData.token} />
          <button type="submit" className="rounded bg-signal px-5 py-2 font-semibold text-white hover:bg-signal-dark">
            Confirm my address
          </button>
        </Form>
      </section>
    );
  }
  const { ok, signedIn } = actionData;
  return (
    <section className="max-w-xl space-y-3" data-testid="verify-result">
      <h1 className="text-3xl font-bold">{ok ? "Address confirmed" : "This link doesn't work"}</h1>
      {ok ? (
        <p>
          Thank you. You can now contribute connector cards.{" "}
          {signedIn ? (
            <Link to="/garage" className="font-semibold underline">
              Go to your garage
            </Link>
          ) : (
            <Link to="/login?notice=verified" className="font-semibold underline">
              Sign in
            </Link>
          )}
          .
        </p>
      ) : (
        <p>
          It has expired or was already used. Sign in and ask for a new link from{" "}
          <Link to="/account" className="font-semibold underline">
            your account
          </Link>
          .
        </p>
      )}
    </section>
  );
}
