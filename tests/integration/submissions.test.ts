/**
 * Submissions and review, in-process against a fresh seeded SQLite file (DB_PATH is set before the database modules are
 * imported). QUALITY.md: D3 two moderators (optimistic locking), D4 decision atomicity, D12 double submit, S2 another
 * contributor's draft, plus the publish itself: a corrected wire colour follows the wire, the loom check stays clean, and
 * every decision is audited with one outbox mail.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mulberry32 } from "../fixtures/random";
import { stateDigest } from "./helpers";

const dir = mkdtempSync(path.join(tmpdir(), "loomlore-subs-"));
const dbPath = path.join(dir, "subs.sqlite");

type Svc = typeof import("../../app/services/submissions.server");
type Models = typeof import("../../db/models/index.ts");
let svc: Svc;
let m: Models;
let checkLibrary: typeof import("../../db/check.ts").checkLibrary;
let closeDb: () => Promise<void>;
let contributor: { id: number; role: "contributor" };
let other: { id: number; role: "contributor" };
let modA: { id: number; role: "moderator" };
let modB: { id: number; role: "moderator" };

const CARD = "rx750-four-pickups-socket"; // loom half; cavity 1's wire runs to the ignition unit plug
const FAMILY = "rx750-four";

beforeAll(async () => {
  process.env.DB_PATH = dbPath;
  process.env.MAIL_WORKER = "off";
  process.env.PHOTO_SWEEPER = "off";
  // The index worker marks each publish's index job done in the background: between D4's two digests it made them differ.
  process.env.SEARCH_WORKER = "off";
  const db = await import("../../db/index.server.ts");
  closeDb = () => db.sequelize.close();
  m = await import("../../db/models/index.ts");
  await (await import("../../db/setup.ts")).setupDatabase();
  checkLibrary = (await import("../../db/check.ts")).checkLibrary;
  svc = await import("../../app/services/submissions.server");
  const user = async (email: string, role: "contributor" | "moderator") => {
    const u =
      (await m.User.findOne({ where: { email } })) ??
      (await m.User.create({
        email,
        displayName: email.split("@")[0],
        passwordHash: "x",
        role,
        emailVerifiedAt: new Date(),
        passwordChangedAt: new Date(),
        createdAt: new Date(),
        disabledAt: null,
      }));
    return { id: u.id, role: u.role as typeof role };
  };
  contributor = (await user("contributor@loomlore.invalid", "contributor")) as typeof contributor;
  other = (await user("second-contributor@loomlore.invalid", "contributor")) as typeof other;
  modA = (await user("moderator@loomlore.invalid", "moderator")) as typeof modA;
  modB = (await user("second-moderator@loomlore.invalid", "moderator")) as typeof modB;
}, 60_000);

afterAll(async () => {
  await closeDb?.();
  rmSync(dir, { recursive: true, force: true });
});

/** An edit of CARD, made ready for review (source given) and submitted; returns its id and version. */
async function editInReview(change: (c: import("../../app/domain/submissions").CardProposal) => void = () => {}) {
  const { id } = await svc.startSubmission(contributor, { connector: CARD });
  const v = (await svc.viewSubmission(contributor, id))!;
  const content = structuredClone(v.content);
  change(content);
  await svc.updateSubmission(contributor, id, {
    version: v.version,
    content,
    sourceKind: "traced",
    sourceDetail: "Traced on a 1979 bike.",
    summary: "Test edit.",
    action: "submit",
  });
  const after = (await svc.viewSubmission(contributor, id))!;
  expect(after.state).toBe("in_review");
  return { id, version: after.version };
}

const count = async (sql: string) => ((await m.Submission.sequelize!.query(sql, { plain: true })) as { n: number }).n;

describe("the way through review", () => {
  it("an edit starts from the published card and shows no change until one is made", async () => {
    const { id } = await svc.startSubmission(contributor, { connector: CARD });
    const v = (await svc.viewSubmission(contributor, id))!;
    expect(v.state).toBe("draft");
    expect(v.kind).toBe("edit");
    expect(v.diff.any).toBe(false);
    expect(v.content.pins.find((p) => p.cavity === "1")!.goesTo).toEqual({ connector: "rx750-four-ignition-unit-plug", cavity: "5" });
    // Without "how you know" it cannot go for review.
    await expect(svc.updateSubmission(contributor, id, { version: v.version, action: "submit" })).rejects.toMatchObject({ status: 400, field: "sourceKind" });
  });

  it("approving a corrected colour publishes a revision; the colour follows the wire to its far end and the loom check stays clean", async () => {
    const before = await m.Connector.findOne({ where: { slug: CARD } });
    const { id, version } = await editInReview((c) => {
      c.pins.find((p) => p.cavity === "1")!.code = "L/W";
    });
    const v = (await svc.viewSubmission(modA, id))!;
    expect(v.diff.pins.find((r) => r.cavity === "1")).toMatchObject({ change: "changed", fields: ["code"] });
    const out = await svc.decide(modA, id, { version, decision: "approve", message: "" });
    expect(out).toMatchObject({ state: "published", connector: CARD, revision: before!.revision + 1 });
    const colourOf = async (slug: string, cavity: string) => {
      const c = await m.Connector.findOne({ where: { slug } });
      return (await m.Pin.findOne({ where: { connectorId: c!.id, cavity } }))!.colourCode;
    };
    expect(await colourOf(CARD, "1")).toBe("L/W");
    expect(await colourOf("rx750-four-pickups-plug", "1")).toBe("L/W"); // the mate
    expect(await colourOf("rx750-four-ignition-unit-plug", "5")).toBe("L/W"); // the wire's far end
    expect(await colourOf("rx750-four-ignition-unit-socket", "5")).toBe("L/W"); // and its mate
    expect(await checkLibrary()).toEqual([]);
    const rev = await m.Revision.findOne({ where: { connectorId: before!.id, number: before!.revision + 1 } });
    expect((rev!.snapshot as { pins: { cavity: string; code: string }[] }).pins.find((p) => p.cavity === "1")!.code).toBe("L/W");
    // The cards that followed got a revision explaining why.
    const far = await m.Connector.findOne({ where: { slug: "rx750-four-ignition-unit-plug" } });
    const farRev = await m.Revision.findOne({ where: { connectorId: far!.id, number: far!.revision } });
    expect(farRev!.summary).toMatch(/follow/);
    expect(await m.AuditLog.count({ where: { action: "review.approve", subjectId: String(id) } })).toBe(1);
    expect(await m.MailOutbox.count({ where: { kind: "review-published" } })).toBe(1);
    expect(await m.IndexJob.count({ where: { subjectId: before!.id } })).toBeGreaterThanOrEqual(1);
  });

  it("return with a question → the contributor answers and resubmits → approve", async () => {
    const { id, version } = await editInReview((c) => {
      c.notes = "The plug body is **grey** on early bikes.";
    });
    const r = await svc.decide(modA, id, { version, decision: "return", message: "Which years have the grey body?" });
    expect(r.state).toBe("returned");
    const v = (await svc.viewSubmission(contributor, id))!;
    expect(v.messages.at(-1)).toMatchObject({ kind: "question", text: "Which years have the grey body?" });
    await expect(svc.updateSubmission(contributor, id, { version: v.version, action: "submit" })).rejects.toMatchObject({ status: 400, field: "answer" });
    await svc.updateSubmission(contributor, id, { version: v.version, action: "submit", answer: "1978 and 1979." });
    const w = (await svc.viewSubmission(modA, id))!;
    expect(w.state).toBe("in_review");
    expect((await svc.decide(modA, id, { version: w.version, decision: "approve", message: "Thanks." })).state).toBe("published");
    expect((await svc.viewSubmission(contributor, id))!.messages.map((x) => x.kind)).toEqual(["question", "answer", "approve"]);
  });

  it("declining needs nothing published and is final", async () => {
    const { id, version } = await editInReview((c) => {
      c.location = "Under the tank";
    });
    const card = await m.Connector.findOne({ where: { slug: CARD } });
    await svc.decide(modA, id, { version, decision: "decline", message: "The card already says so." });
    expect((await m.Connector.findOne({ where: { slug: CARD } }))!.revision).toBe(card!.revision);
    await expect(svc.decide(modB, id, { version: version + 1, decision: "approve", message: "" })).rejects.toMatchObject({ status: 409 });
  });

  it("a moderator cannot review their own submission", async () => {
    const { id } = await svc.startSubmission(modA, { connector: CARD });
    const v = (await svc.viewSubmission(modA, id))!;
    await svc.updateSubmission(modA, id, { version: v.version, sourceKind: "measured", action: "submit" });
    const w = (await svc.viewSubmission(modA, id))!;
    expect(w.canReview).toBe(false);
    await expect(svc.decide(modA, id, { version: w.version, decision: "approve", message: "" })).rejects.toMatchObject({ status: 403 });
  });

  it("an edit begun before another was published is refused on approval (no lost update)", async () => {
    const first = await editInReview((c) => {
      c.housing = "4-way, grey";
    });
    const second = await editInReview((c) => {
      c.housing = "4-way, black";
    });
    await svc.decide(modA, first.id, { version: first.version, decision: "approve", message: "" });
    expect((await svc.viewSubmission(modA, second.id))!.stale).toBe(true);
    await expect(svc.decide(modA, second.id, { version: second.version, decision: "approve", message: "" })).rejects.toMatchObject({ status: 409 });
    expect((await svc.viewSubmission(modA, second.id))!.state).toBe("in_review"); // rolled back whole
  });

  it("a new card with a family request publishes the family and the card together", async () => {
    const { id } = await svc.startSubmission(contributor, {
      familyRequest: {
        make: "asagiri",
        name: "RX250 Twin",
        modelRange: "RX250",
        yearFrom: 1976,
        yearTo: 1980,
        engine: "parallel twin",
        cylinders: 2,
        displacementCc: 250,
        firingOrder: "1-2",
        ignition: "points",
      },
    });
    const v = (await svc.viewSubmission(contributor, id))!;
    const content = {
      ...v.content,
      name: "Points plug",
      location: "Under the seat",
      housing: "2-way",
      gender: "socket" as const,
      system: "ignition",
      pins: [
        { cavity: "1", code: "B", circuit: "Points feed", terminal: "1", goesTo: null },
        { cavity: "2", code: "G", circuit: "Earth", terminal: "31", goesTo: null },
      ],
    };
    await svc.updateSubmission(contributor, id, { version: v.version, content, sourceKind: "manual", sourceDetail: "Service manual p. 7-3", action: "submit" });
    const w = (await svc.viewSubmission(modA, id))!;
    expect(w.diff.pins.every((r) => r.change === "added")).toBe(true);
    const out = await svc.decide(modA, id, { version: w.version, decision: "approve", message: "" });
    expect(out.connector).toMatch(/^rx250-twin-points-plug$/);
    const card = await m.Connector.findOne({ where: { slug: out.connector! }, include: [{ model: m.Family, as: "family" }] });
    expect(card!.family!.name).toBe("RX250 Twin");
    expect(card!.revision).toBe(1);
    expect(await checkLibrary()).toEqual([]);
  });
});

describe("S2: a draft is its author's (and moderators')", () => {
  it("another contributor cannot see or change it", async () => {
    const { id } = await svc.startSubmission(contributor, { connector: CARD });
    expect(await svc.viewSubmission(other, id)).toBeNull();
    expect(await svc.viewSubmission(null, id)).toBeNull();
    expect(await svc.viewSubmission(modB, id)).not.toBeNull();
    await expect(svc.updateSubmission(other, id, { version: 1, summary: "mine now" })).rejects.toMatchObject({ status: 404 });
    await expect(svc.updateSubmission(modB, id, { version: 1, summary: "moderators do not edit drafts" })).rejects.toMatchObject({ status: 404 });
  });
});

describe("D12: double submit", () => {
  it("two identical starts with one idempotency key make one submission", async () => {
    const key = "double-click-key-1";
    const [a, b] = await Promise.all([
      svc.startSubmission(contributor, { connector: CARD, idempotencyKey: key }),
      svc.startSubmission(contributor, { connector: CARD, idempotencyKey: key }),
    ]);
    expect(a.id).toBe(b.id);
    expect([a.created, b.created].filter(Boolean)).toHaveLength(1);
    expect(await m.Submission.count({ where: { idempotencyKey: key } })).toBe(1);
  });

  it("submitting twice with the same version: the second is refused and nothing is sent twice", async () => {
    const { id } = await svc.startSubmission(contributor, { connector: CARD });
    const v = (await svc.viewSubmission(contributor, id))!;
    const send = () => svc.updateSubmission(contributor, id, { version: v.version, sourceKind: "traced", action: "submit" });
    const results = await Promise.allSettled([send(), send()]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    expect(results.find((r) => r.status === "rejected")).toMatchObject({ reason: { status: 409 } });
    expect(await m.AuditLog.count({ where: { action: "submission.submit", subjectId: String(id) } })).toBe(1);
  });
});

describe("D3: two moderators on one item", () => {
  it("exactly one decision wins over 100 random interleavings; the loser gets 409 with the current state", async () => {
    const rnd = mulberry32(3);
    for (let i = 0; i < 100; i++) {
      const approveRace = i % 10 === 0; // every tenth race includes a publish; the rest return vs decline
      const { id, version } = await editInReview((c) => {
        c.notes = `Race ${i}.`;
      });
      const a = approveRace ? ("approve" as const) : ("return" as const);
      const delay = (ms: number) => new Promise((r) => setTimeout(r, ms));
      const [ra, rb] = await Promise.allSettled([
        delay(Math.floor(rnd() * 5)).then(() => svc.decide(modA, id, { version, decision: a, message: "Question A?" })),
        delay(Math.floor(rnd() * 5)).then(() => svc.decide(modB, id, { version, decision: "decline", message: "Reason B." })),
      ]);
      const won = [ra, rb].filter((r) => r.status === "fulfilled");
      expect(won, `race ${i}`).toHaveLength(1);
      const lost = [ra, rb].find((r) => r.status === "rejected") as PromiseRejectedResult;
      expect(lost.reason).toMatchObject({ status: 409, current: { version: version + 1 } });
      expect(
        await m.AuditLog.count({ where: { subjectType: "submission", subjectId: String(id), action: ["review.approve", "review.return", "review.decline"] } }),
      ).toBe(1);
      expect(await count(`SELECT COUNT(*) AS n FROM mail_outbox WHERE text LIKE '%/submissions/${id}%'`)).toBe(1);
      const s = await m.Submission.findByPk(id);
      expect(s!.version).toBe(version + 1);
      if (s!.state === "published") expect(await m.IndexJob.count({ where: { kind: "connector", createdAt: s!.decidedAt! } })).toBeGreaterThanOrEqual(1);
    }
  }, 120_000);
});

describe("D4: a decision is all or nothing", () => {
  for (const point of ["submission", "card", "revision", "message", "audit", "outbox", "index"] as const) {
    it(`a failure after the ${point} write leaves the database exactly as it was`, async () => {
      const { id, version } = await editInReview((c) => {
        c.pins.find((p) => p.cavity === "2")!.circuit = `Pickup (${point})`;
      });
      const digest = await stateDigest(dbPath);
      svc.setDecisionFaultHook((p) => {
        if (p === point) throw new Error(`injected after ${p}`);
      });
      try {
        await expect(svc.decide(modA, id, { version, decision: "approve", message: "Publishing." })).rejects.toThrow(`injected after ${point}`);
      } finally {
        svc.setDecisionFaultHook(null);
      }
      expect(await stateDigest(dbPath)).toBe(digest);
      // And the same decision goes through once the fault is gone.
      expect((await svc.decide(modA, id, { version, decision: "approve", message: "Publishing." })).state).toBe("published");
    });
  }
});

describe("mistake reports in the queue", () => {
  it("an open report is a queue item; closing it is audited and a second close is a 409", async () => {
    const card = await m.Connector.findOne({ where: { slug: CARD } });
    const r = await m.MistakeReport.create({
      userId: other.id,
      connectorId: card!.id,
      revision: card!.revision,
      text: "Cavity 3 is violet on mine.",
      createdAt: new Date(),
    });
    const queue = await svc.reviewQueue({ family: FAMILY });
    expect(queue.items.some((it) => it.key === `report-${r.id}`)).toBe(true);
    await svc.closeReport(modA, r.id, "dismissed", "Checked two bikes: it is pink.");
    await expect(svc.closeReport(modB, r.id, "resolved", "Fixed.")).rejects.toMatchObject({ status: 409 });
    expect(await m.AuditLog.count({ where: { action: "report.dismissed", subjectId: String(r.id) } })).toBe(1);
    expect((await svc.reviewQueue({})).items.some((it) => it.key === `report-${r.id}`)).toBe(false);
  });

  it("the queue is oldest first and filters by make and family", async () => {
    const { items } = await svc.reviewQueue({});
    const times = items.map((it) => it.at);
    expect([...times].sort()).toEqual(times);
    expect(
      (await svc.reviewQueue({ family: "marquis-500" })).items.every((it) => (it.submission?.family?.slug ?? it.report?.family.slug) === "marquis-500"),
    ).toBe(true);
  });
});

describe("spec conditions, kind, material and an open maximum through publishing", () => {
  // Invented demo texts; the demo data's own conditions are not relied on.
  const CONDITIONS = "Ignition off, plug apart, meter on the 2 kΩ range";
  // A card of the family with a spec value (whichever the demo data gives one).
  const cardWithSpecs = async () => {
    const family = await m.Family.findOne({ where: { slug: FAMILY } });
    for (const c of await m.Connector.findAll({ where: { familyId: family!.id }, order: [["id", "ASC"]] })) {
      if (await m.SpecValue.count({ where: { connectorId: c.id } })) return c.slug;
    }
    throw new Error("no demo card with a spec");
  };
  async function inReview(slug: string, change: (c: import("../../app/domain/submissions").CardProposal) => void) {
    const { id } = await svc.startSubmission(contributor, { connector: slug });
    const v = (await svc.viewSubmission(contributor, id))!;
    const content = structuredClone(v.content);
    change(content);
    await svc.updateSubmission(contributor, id, {
      version: v.version,
      content,
      sourceKind: "measured",
      sourceDetail: "",
      summary: "Conditions.",
      action: "submit",
    });
    const after = (await svc.viewSubmission(contributor, id))!;
    expect(after.state).toBe("in_review");
    return { id, version: after.version };
  }

  it("a changed spec without conditions is refused at submit, naming the field", async () => {
    const { id } = await svc.startSubmission(contributor, { connector: await cardWithSpecs() });
    const v = (await svc.viewSubmission(contributor, id))!;
    expect(v.content.specs.length).toBeGreaterThan(0);
    const content = structuredClone(v.content);
    content.specs[0] = { ...content.specs[0], min: content.specs[0].min + 1, conditions: "" };
    await expect(svc.updateSubmission(contributor, id, { version: v.version, content, sourceKind: "measured", action: "submit" })).rejects.toMatchObject({
      status: 400,
      field: "specs.0.conditions",
    });
  });

  it("publishing writes them to the card's spec rows and its revision snapshot", async () => {
    const slug = await cardWithSpecs();
    // The demo states each reading's material, so the edit changes it to a material the spec does not have yet.
    let material: "copper" | "other" = "copper";
    const { id, version } = await inReview(slug, (c) => {
      material = c.specs[0].material === "copper" ? "other" : "copper";
      c.specs[0] = { ...c.specs[0], conditions: CONDITIONS, material };
      c.specs.push({
        name: "Pickup insulation to earth",
        min: 1,
        max: null,
        unit: "MΩ",
        between: c.specs[0].between,
        atC: 20,
        source: "Measured",
        conditions: "Ignition off, plug apart, both cavities to the engine",
        kind: "insulation",
        material: null,
      });
    });
    const v = (await svc.viewSubmission(modA, id))!;
    expect(v.diff.specs[0].fields).toEqual(["conditions", "material"]);
    const out = await svc.decide(modA, id, { version, decision: "approve", message: "" });
    const card = await m.Connector.findOne({ where: { slug } });
    const rows = await m.SpecValue.findAll({ where: { connectorId: card!.id }, order: [["id", "ASC"]] });
    const firstName = v.content.specs[0].name;
    const pick = <T extends { name: string }>(list: T[]) => [
      list.find((r) => r.name === firstName)!,
      list.find((r) => r.name === "Pickup insulation to earth")!,
    ];
    expect(rows).toHaveLength(v.content.specs.length);
    expect(pick(rows).map((r) => [r.conditions, r.kind, r.material, r.max === null])).toEqual([
      [CONDITIONS, "resistance", material, false],
      ["Ignition off, plug apart, both cavities to the engine", "insulation", null, true],
    ]);
    // The other specs keep what they had.
    for (const r of rows.slice(1, -1)) expect(r.conditions).toBe(v.before!.specs.find((b) => b.name === r.name)!.conditions);
    const rev = await m.Revision.findOne({ where: { connectorId: card!.id, number: out.revision! } });
    const snap = rev!.snapshot as { specs: { name: string; conditions: string; kind: string; material: string | null; max: number | null }[] };
    expect(pick(snap.specs).map((s) => [s.conditions, s.kind, s.material, s.max])).toEqual([
      [CONDITIONS, "resistance", material, pick(rows)[0].max],
      ["Ignition off, plug apart, both cavities to the engine", "insulation", null, null],
    ]);
    expect(await checkLibrary()).toEqual([]);
    // Unchanged specs need not restate anything: an edit that touches only a pin goes in for review.
    await inReview(slug, (c) => {
      c.pins[0] = { ...c.pins[0], circuit: `${c.pins[0].circuit} (checked)` };
    });
  });
});
