/**
 * The submissions and review JSON routes (API.md "Accounts and contributions") through the production server with the
 * mail stand-in: guards (401/403/404), optimistic locking (409 with the current version), S13 mass assignment, S10
 * stored XSS through notes and pin fields on the published card page, and the contributor ↔ moderator loop with both
 * outcome mails captured by the stand-in.
 */
import { DomUtils, parseDocument } from "htmlparser2";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import sharp from "sharp";
import { COOKIE, DEMO, req, signIn, where, type Role } from "../support/http";
import { startServer, type TestServer } from "../support/server";
import { stateDigest } from "./helpers";

let srv: TestServer;
const sessions = {} as Record<Role, string>;
const CARD = "rx750-four-pickups-socket";

beforeAll(async () => {
  srv = await startServer({ mail: true, env: { MAIL_POLL_MS: "200" } });
  for (const role of ["rider", "contributor", "moderator", "admin"] as Role[]) sessions[role] = await signIn(srv, DEMO[role].email, DEMO[role].password);
}, 120_000);
afterAll(async () => srv?.stop());

const json = (r: { body: string }) => JSON.parse(r.body);
type Sub = {
  id: number;
  version: number;
  state: string;
  content: { pins: { cavity: string; code: string | null; circuit: string; terminal: string | null }[]; notes: string; name: string };
  problems: unknown[];
};

async function start(session: string, body: unknown) {
  const r = await req(srv, "/api/v1/submissions", { json: body, session });
  return { r, s: r.status < 300 ? (json(r).submission as Sub) : null };
}

describe("guards", () => {
  it("anonymous 401, an unverified rider 403, a contributor 201", async () => {
    expect((await req(srv, "/api/v1/submissions", { json: { connector: CARD } })).status).toBe(401);
    expect((await req(srv, "/api/v1/submissions", { json: { connector: CARD }, session: sessions.rider })).status).toBe(403);
    const { r, s } = await start(sessions.contributor, { connector: CARD });
    expect(r.status, where(r)).toBe(201);
    expect(s).toMatchObject({ state: "draft", kind: "edit", version: 1 });
  });

  it("another contributor's draft is a 404, for reading and for writing; moderators may read it", async () => {
    const { s } = await start(sessions.contributor, { connector: CARD });
    expect((await req(srv, `/api/v1/submissions/${s!.id}`, { session: sessions.rider })).status).toBe(404);
    expect((await req(srv, `/api/v1/submissions/${s!.id}`, { method: "PATCH", json: { version: 1, summary: "x" }, session: sessions.moderator })).status).toBe(
      404,
    );
    expect((await req(srv, `/api/v1/submissions/${s!.id}`, { session: sessions.moderator })).status).toBe(200);
    expect((await req(srv, `/submissions/${s!.id}`, { session: sessions.rider })).status).toBe(404);
    expect((await req(srv, "/api/v1/submissions/999999", { session: sessions.contributor })).status).toBe(404);
    expect((await req(srv, "/api/v1/submissions/not-a-number", { session: sessions.contributor })).status).toBe(404);
  });

  it("only moderators decide: contributor 403, anonymous 401, cross-site 403", async () => {
    const body = { version: 1, decision: "approve" };
    expect((await req(srv, "/api/v1/submissions/1/review", { json: body })).status).toBe(401);
    expect((await req(srv, "/api/v1/submissions/1/review", { json: body, session: sessions.contributor })).status).toBe(403);
    expect((await req(srv, "/api/v1/submissions/1/review", { json: body, session: sessions.moderator, origin: "https://evil.example" })).status).toBe(403);
    expect((await req(srv, "/api/v1/submissions/1/review", { session: sessions.moderator })).status).toBe(405);
  });

  it("bad bodies are 400/415, never 500", async () => {
    for (const body of [
      {},
      { connector: "Not A Slug" },
      { connector: CARD, family: "rx750-four" },
      { family: "rx750-four", content: { pins: "x" } },
      { familyRequest: { make: "asagiri" } },
    ]) {
      const r = await req(srv, "/api/v1/submissions", { json: body, session: sessions.contributor });
      expect(r.status, JSON.stringify(body)).toBe(400);
      expect(json(r).error.code).toBe("bad_request");
    }
    expect((await req(srv, "/api/v1/submissions", { method: "POST", headers: { "Content-Type": "text/plain" }, session: sessions.contributor })).status).toBe(
      415,
    );
    expect((await start(sessions.contributor, { family: "no-such-family" })).r.status).toBe(404);
  });
});

describe("S2: a draft's photos", () => {
  it("are served to their author and moderators only; anyone else gets 404; served photos are inert images", async () => {
    const { s } = await start(sessions.contributor, { connector: CARD });
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: "#808080" } })
      .jpeg()
      .toBuffer();
    const form = new FormData();
    form.append("photo", new Blob([new Uint8Array(jpeg)], { type: "image/jpeg" }), "p.jpg");
    form.append("consent", "yes");
    form.append("submission", String(s!.id));
    const up = await fetch(`${srv.url}/api/v1/photos`, {
      method: "POST",
      body: form,
      headers: { Cookie: `${COOKIE}=${sessions.contributor}`, Origin: srv.url },
    });
    expect(up.status, await up.clone().text()).toBe(201);
    const { photo } = (await up.json()) as { photo: { id: string; url: string; thumbUrl: string } };
    for (const [who, status] of [
      [null, 404],
      [sessions.rider, 404],
      [sessions.contributor, 200],
      [sessions.moderator, 200],
    ] as const) {
      const r = await req(srv, photo.url, { session: who });
      expect(r.status, `${photo.url} as ${who ? "signed in" : "anonymous"}`).toBe(status);
      if (status === 200) {
        expect(r.headers.get("content-type")).toBe("image/webp");
        expect(r.headers.get("x-content-type-options")).toBe("nosniff");
        expect(r.headers.get("content-security-policy")).toMatch(/default-src 'none'/);
        expect(r.headers.get("cache-control")).toMatch(/private|no-store/);
      }
    }
    expect((await req(srv, "/uploads/photos/" + photo.id + ".webp")).status).toBe(404); // no route serves the raw directory
    // The draft lists it, with a bumped version.
    expect(json(await req(srv, `/api/v1/submissions/${s!.id}`, { session: sessions.contributor })).submission.content.photos).toEqual([
      expect.objectContaining({ id: photo.id }),
    ]);
  });
});

describe("S13: mass assignment", () => {
  it("extra fields (state, authorId, role, version, bikeCheckedCount) are ignored", async () => {
    const { r, s } = await start(sessions.contributor, {
      connector: CARD,
      state: "published",
      authorId: 1,
      role: "admin",
      version: 999,
      bikeCheckedCount: 1000,
      idempotencyKey: "mass-assign-1",
    });
    expect(r.status, where(r)).toBe(201);
    expect(s).toMatchObject({ state: "draft", version: 1 });
    const u = await req(srv, `/api/v1/submissions/${s!.id}`, {
      method: "PATCH",
      json: { version: 1, state: "published", authorId: 1, publishedRevision: 9, decidedBy: 1, summary: "only this" },
      session: sessions.contributor,
    });
    expect(u.status, where(u)).toBe(200);
    expect(json(u).submission).toMatchObject({ state: "draft", version: 2, summary: "only this", author: { displayName: DEMO.contributor.displayName } });
  });
});

describe("optimistic locking and double submit", () => {
  it("a stale version is a 409 with the current state and version, and changes nothing", async () => {
    const { s } = await start(sessions.contributor, { connector: CARD });
    expect(
      (await req(srv, `/api/v1/submissions/${s!.id}`, { method: "PATCH", json: { version: 1, summary: "first" }, session: sessions.contributor })).status,
    ).toBe(200);
    const digest = await stateDigest(srv.dbPath);
    const r = await req(srv, `/api/v1/submissions/${s!.id}`, { method: "PATCH", json: { version: 1, summary: "second" }, session: sessions.contributor });
    expect(r.status).toBe(409);
    expect(json(r).error).toMatchObject({ code: "conflict", current: { state: "draft", version: 2 } });
    expect(await stateDigest(srv.dbPath)).toBe(digest);
  });

  it("D12: the same idempotency key twice → one submission (201 then 200 with the same id)", async () => {
    const body = { connector: CARD, idempotencyKey: "dbl-click-abcdef" };
    const [a, b] = await Promise.all([start(sessions.contributor, body), start(sessions.contributor, body)]);
    expect([a.r.status, b.r.status].sort()).toEqual([200, 201]);
    expect(a.s!.id).toBe(b.s!.id);
  });
});

describe("S10 and the whole loop: submit → return with a question → answer → approve", () => {
  const XSS = [
    "<script>alert(1)</script>",
    "<img src=x onerror=alert(1)>",
    "[x](javascript:alert(1))",
    '<a href="&#106;avascript:alert(1)">j</a>',
    "<svg><foreignObject><script>alert(1)</script></foreignObject></svg>",
    '<iframe srcdoc="<script>alert(1)</script>"></iframe>',
    '<form action="javascript:alert(1)"><button formaction="javascript:alert(1)">go</button></form>',
    "[d](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)",
    '<a href="https://example.org" target="_blank">ok link</a>',
    "<style>body{display:none}</style>",
    "<object data=x></object><embed src=x>",
  ]; // OWASP XSS Filter Evasion Cheat Sheet payloads (../shared/REFERENCE-FACTS.md §7.1)

  it("publishes the new revision, renders every payload inert, and both outcome mails reach the stand-in", async () => {
    const { s } = await start(sessions.contributor, { connector: CARD, idempotencyKey: "s10-loop-1" });
    const content = structuredClone(s!.content);
    content.notes = XSS.join("\n\n");
    content.pins[1].circuit = "<script>alert('circuit')</script>";
    content.pins[2].circuit = '"><img src=x onerror=alert(2)>';
    let r = await req(srv, `/api/v1/submissions/${s!.id}`, {
      method: "PATCH",
      json: { version: s!.version, content, sourceKind: "traced", sourceDetail: "On my 1979 bike", summary: "Circuit names", action: "submit" },
      session: sessions.contributor,
    });
    expect(r.status, where(r)).toBe(200);
    let sub = json(r).submission as Sub;
    expect(sub.state).toBe("in_review");

    r = await req(srv, `/api/v1/submissions/${sub.id}/review`, { json: { version: sub.version, decision: "return" }, session: sessions.moderator });
    expect(r.status, "a return needs a question").toBe(400);
    r = await req(srv, `/api/v1/submissions/${sub.id}/review`, {
      json: { version: sub.version, decision: "return", message: "Which year did you trace?" },
      session: sessions.moderator,
    });
    expect(r.status, where(r)).toBe(200);
    sub = json(r).submission;
    expect(sub.state).toBe("returned");
    // The loser of a race: the same version again is a 409.
    expect(
      (
        await req(srv, `/api/v1/submissions/${sub.id}/review`, {
          json: { version: sub.version - 1, decision: "decline", message: "late" },
          session: sessions.admin,
        })
      ).status,
    ).toBe(409);

    r = await req(srv, `/api/v1/submissions/${sub.id}`, {
      method: "PATCH",
      json: { version: sub.version, action: "submit", answer: "A 1979 bike." },
      session: sessions.contributor,
    });
    expect(r.status, where(r)).toBe(200);
    sub = json(r).submission;
    expect(sub.state).toBe("in_review");
    r = await req(srv, `/api/v1/submissions/${sub.id}/review`, { json: { version: sub.version, decision: "approve" }, session: sessions.moderator });
    expect(r.status, where(r)).toBe(200);
    const outcome = json(r).outcome as { connector: string; revision: number };
    expect(outcome.connector).toBe(CARD);

    const card = json(await req(srv, `/api/v1/connectors/${CARD}`)).connector;
    expect(card.revision.number).toBe(outcome.revision);
    expect(card.pins[1].circuit).toBe("<script>alert('circuit')</script>"); // stored as typed, shown as text

    const page = await req(srv, `/connectors/${CARD}`);
    expect(page.status).toBe(200);
    const nodes = parseDocument(page.body).children;
    const main = DomUtils.findOne((e) => e.name === "main", nodes)!;
    const bad = DomUtils.findAll(
      (e) =>
        ["script", "iframe", "object", "embed", "form", "style"].includes(e.name) ||
        (e.name === "svg" && !e.attribs["aria-label"] && !e.attribs.role && !e.attribs["aria-hidden"]),
      [main],
    );
    expect(bad.filter((e) => e.name !== "svg").map((e) => e.name)).toEqual([]);
    const notes = DomUtils.findOne((e) => e.attribs.class?.includes("prose") ?? false, [main])!;
    expect(DomUtils.findAll((e) => e.name === "svg", [notes])).toEqual([]);
    for (const el of DomUtils.findAll(() => true, [main])) {
      for (const [k, v] of Object.entries(el.attribs)) {
        expect(k.startsWith("on"), `${el.name} ${k}`).toBe(false);
        if (k === "href" || k === "src" || k === "action" || k === "formaction") expect(v, `${el.name} ${k}=${v}`).toMatch(/^(https?:|mailto:|\/|#|\?|[^:]*$)/);
      }
    }
    for (const a of DomUtils.findAll((e) => e.name === "a" && e.attribs.href?.startsWith("https://example.org"), [notes]))
      expect(a.attribs.rel).toMatch(/noopener/);
    expect(page.body).toContain("&lt;script&gt;alert(&#x27;circuit&#x27;)&lt;/script&gt;");

    // Both outcome mails (returned, then published) reach the stand-in.
    const deadline = Date.now() + 20_000;
    let subjects: string[] = [];
    while (Date.now() < deadline) {
      const list = (await (await fetch(`${srv.mailHttp}/messages`)).json()) as { to: string; subject: string }[];
      subjects = list.filter((m) => m.to.includes(DEMO.contributor.email)).map((m) => m.subject);
      if (subjects.some((x) => /published/i.test(x)) && subjects.some((x) => /needs another look/i.test(x))) break;
      await new Promise((ok) => setTimeout(ok, 250));
    }
    expect(
      subjects.filter((x) => /published/i.test(x)),
      subjects.join(" | "),
    ).toHaveLength(1);
  }, 60_000);
});

describe("spec conditions end to end: contribute → review diff → publish → card page, JSON and bench sheet", () => {
  type Spec = {
    name: string;
    min: number;
    max: number | null;
    unit: string;
    between: [string, string];
    atC: number;
    source: string;
    conditions: string;
    kind: string;
    material: string | null;
  };
  type El = ReturnType<typeof DomUtils.findAll>[number];
  const dom = (html: string) => {
    const nodes = parseDocument(html).children;
    const all = (pred: (e: El) => boolean) => DomUtils.findAll(pred, nodes);
    const text = (e: El | undefined) => (e ? DomUtils.textContent(e).replace(/\s+/g, " ").trim() : "");
    return { all, text };
  };
  // Invented demo conditions, not the demo data's own texts (those are rewritten separately).
  const CONDITIONS = "Ignition off, plug apart, across the two cavities of the part's side, meter on the 2 kΩ range";
  const INSULATION: Omit<Spec, "between"> = {
    name: "Winding to engine (insulation)",
    min: 1,
    max: null,
    unit: "MΩ",
    atC: 20,
    source: "Measured with a meter",
    conditions: "Ignition off, plug apart, both cavities joined, to bare metal of the engine, meter on its top range",
    kind: "insulation",
    material: null,
  };

  it("a spec without conditions cannot be sent for review; with them it publishes and every view carries them", async () => {
    // A demo card with a spec, other than the one the loop above edits.
    const familyBody = json(await req(srv, "/api/v1/families/rx750-four")).family as { systems: { connectors: { slug: string }[] }[] };
    let slug = "";
    for (const c of familyBody.systems.flatMap((x) => x.connectors)) {
      if (c.slug === CARD) continue;
      if ((json(await req(srv, `/api/v1/connectors/${c.slug}`)).connector.specs as Spec[]).length) {
        slug = c.slug;
        break;
      }
    }
    expect(slug, "a demo card with a spec").not.toBe("");

    const { s } = await start(sessions.contributor, { connector: slug, idempotencyKey: "spec-conditions-1" });
    const content = structuredClone(s!.content) as unknown as { specs: Spec[] };
    expect(content.specs.length).toBeGreaterThan(0);
    const first = content.specs[0];
    // Changed, but no conditions stated: a clear field error names it.
    content.specs[0] = { ...first, min: first.min + 1, conditions: "" };
    let r = await req(srv, `/api/v1/submissions/${s!.id}`, {
      method: "PATCH",
      json: { version: s!.version, content, sourceKind: "measured", sourceDetail: "", summary: "Measuring conditions", action: "submit" },
      session: sessions.contributor,
    });
    expect(r.status, where(r)).toBe(400);
    expect(json(r).error.field).toBe("specs.0.conditions");
    expect(json(r).error.problems.map((p: { field: string }) => p.field)).toContain("specs.0.conditions");

    // The demo states each reading's material: change it to one the spec does not have yet.
    const material = first.material === "copper" ? "other" : "copper";
    content.specs[0] = { ...first, conditions: CONDITIONS, material };
    content.specs.push({ ...INSULATION, between: first.between });
    const version = json(await req(srv, `/api/v1/submissions/${s!.id}`, { session: sessions.contributor })).submission.version;
    r = await req(srv, `/api/v1/submissions/${s!.id}`, {
      method: "PATCH",
      json: { version, content, sourceKind: "measured", summary: "Measuring conditions", action: "submit" },
      session: sessions.contributor,
    });
    expect(r.status, where(r)).toBe(200);
    const sub = json(r).submission as { id: number; version: number; state: string; diff: { specs: { change: string; fields: string[] }[] } };
    expect(sub.state).toBe("in_review");
    expect(sub.diff.specs[0]).toMatchObject({ change: "changed" });
    expect(sub.diff.specs[0].fields).toEqual(expect.arrayContaining(["conditions", "material"]));
    expect(sub.diff.specs.at(-1)!.change).toBe("added");

    // The moderator's review page shows the changed condition, what it was and the open maximum.
    const review = dom((await req(srv, `/review/${sub.id}`, { session: sessions.moderator })).body);
    const row = review.all((e) => e.name === "tr" && e.attribs["data-spec"] === first.name && e.attribs["data-change"] === "changed")[0];
    const cond = DomUtils.findOne((e) => e.attribs["data-field"] === "conditions", [row])!;
    expect(cond.attribs["data-changed"]).toBe("true");
    expect(review.text(cond)).toContain(CONDITIONS);
    const added = review.all((e) => e.name === "tr" && e.attribs["data-spec"] === INSULATION.name)[0];
    expect(review.text(DomUtils.findOne((e) => e.attribs["data-field"] === "range", [added])!)).toBe("≥ 1 MΩ (open: no upper limit)");

    r = await req(srv, `/api/v1/submissions/${sub.id}/review`, { json: { version: sub.version, decision: "approve" }, session: sessions.moderator });
    expect(r.status, where(r)).toBe(200);

    // JSON: the published specs carry conditions, kind, material and the null maximum.
    const specs = json(await req(srv, `/api/v1/connectors/${slug}`)).connector.specs as Spec[];
    expect(specs.find((x) => x.name === first.name)).toMatchObject({ conditions: CONDITIONS, material, min: first.min, max: first.max, kind: first.kind });
    expect(specs.find((x) => x.name === INSULATION.name)).toMatchObject({ max: null, kind: "insulation", conditions: INSULATION.conditions, material: null });

    // The card page: conditions beside the value, the kind where it is not a resistance, "≥ min" and open.
    const card = dom((await req(srv, `/connectors/${slug}`)).body);
    const specRow = (name: string) => card.all((e) => e.name === "tr" && e.attribs["data-spec"] === name)[0];
    expect(card.text(DomUtils.findOne((e) => e.attribs["data-conditions"] !== undefined, [specRow(first.name)])!)).toBe(`measure: ${CONDITIONS}`);
    const insul = specRow(INSULATION.name);
    expect(card.text(DomUtils.findOne((e) => e.attribs["data-kind"] !== undefined, [insul])!)).toBe("(insulation (must read open))");
    expect(card.text(DomUtils.findOne((e) => e.attribs["data-range"] !== undefined, [insul])!)).toBe("≥ 1 MΩ open (no upper limit)");

    // The bench sheet started from the card: each row carries its material, conditions and open maximum.
    const bench = dom((await req(srv, `/bench?connector=${slug}`)).body);
    const benchRow = (i: number) => bench.all((e) => e.name === "tr" && e.attribs["data-row"] === String(i))[0];
    const field = (i: number, name: string) => DomUtils.findOne((e) => e.attribs.name === name, [benchRow(i)])!;
    const chosen = (sel: El) => DomUtils.findAll((o) => o.name === "option" && "selected" in o.attribs, [sel])[0]?.attribs.value ?? "";
    const i0 = specs.findIndex((x) => x.name === first.name);
    const i1 = specs.findIndex((x) => x.name === INSULATION.name);
    expect(chosen(field(i0, `mt${i0}`))).toBe(material);
    expect(field(i0, `c${i0}`).attribs.value).toBe(CONDITIONS);
    expect(bench.text(DomUtils.findOne((e) => e.attribs["data-conditions"] !== undefined, [benchRow(i0)])!)).toBe(`Measure: ${CONDITIONS}`);
    expect(field(i1, `hi${i1}`).attribs.value).toBe("open");
    expect(DomUtils.findOne((e) => e.attribs["data-kind"] === "insulation", [benchRow(i1)])).not.toBeNull();

    // A meter's OL on that open-circuit row is a pass, kept in the address.
    const q = new URLSearchParams({ n0: INSULATION.name, lo0: "1", hi0: "open", u0: "MΩ", m0: "OL", k0: "insulation", c0: INSULATION.conditions });
    const checked = dom((await req(srv, `/bench?${q}`)).body);
    expect(checked.all((e) => e.attribs["data-verdict"] === "in_range")).toHaveLength(1);

    // The next edit starts from the published snapshot, conditions and all.
    const next = (await start(sessions.contributor, { connector: slug, idempotencyKey: "spec-conditions-2" })).s!;
    const nextSpecs = (next.content as unknown as { specs: Spec[] }).specs;
    expect(nextSpecs.find((x) => x.name === INSULATION.name)).toMatchObject({ max: null, kind: "insulation", conditions: INSULATION.conditions });
    expect(nextSpecs.find((x) => x.name === first.name)).toMatchObject({ conditions: CONDITIONS, material });
  }, 60_000);
});
