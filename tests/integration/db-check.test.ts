/**
 * db/check.ts on the invented demo library: the seeded data is consistent, and each kind of fault the check exists for is reported.
 * In-process against a fresh SQLite file (DB_PATH is set before the database modules are imported: the Sequelize instance reads it
 * at import). Each fault is injected, checked and undone; a state digest (QUALITY.md) proves every undo restored the database exactly.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Op } from "sequelize";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { execSql, stateDigest } from "./helpers";

type Models = typeof import("../../db/models/index.ts");
type FamilyRow = InstanceType<Models["Family"]>;
type ConnectorRow = InstanceType<Models["Connector"]>;

const root = path.resolve(import.meta.dirname, "../..");
const dir = mkdtempSync(path.join(tmpdir(), "loomlore-check-"));
const dbPath = path.join(dir, "check.sqlite");

let m: Models;
let checkLibrary: () => Promise<string[]>;
let closeDb: () => Promise<void>;
let baseline: string;
let families: FamilyRow[];

beforeAll(async () => {
  process.env.DB_PATH = dbPath;
  const db = await import("../../db/index.server.ts");
  // Guard: a Sequelize instance left over from an earlier import would silently point at another file.
  expect(db.databasePath()).toBe(dbPath);
  expect((db.sequelize as unknown as { options: { storage?: string } }).options.storage).toBe(dbPath);
  const { setupDatabase } = await import("../../db/setup.ts");
  ({ checkLibrary } = await import("../../db/check.ts"));
  m = await import("../../db/models/index.ts");
  closeDb = () => db.sequelize.close();
  expect(await setupDatabase()).toBe(true); // a fresh file: migrated and seeded
  families = await m.Family.findAll({ order: [["id", "ASC"]] });
  baseline = await stateDigest(dbPath);
});

afterEach(async () => {
  // Every fault below is undone in a finally: the database must be byte-for-byte the seeded one again.
  expect(await stateDigest(dbPath), "a fault was not undone completely").toBe(baseline);
});

afterAll(async () => {
  await closeDb?.();
  rmSync(dir, { recursive: true, force: true });
});

/** Inject a fault, run the check, undo the fault (even if the check throws). */
async function withFault(inject: () => Promise<() => Promise<unknown>>): Promise<string[]> {
  const undo = await inject();
  try {
    return await checkLibrary();
  } finally {
    await undo();
  }
}

const loomConnectors = (f: FamilyRow) => m.Connector.findAll({ where: { familyId: f.id, componentId: null }, order: [["id", "ASC"]] });
const ownerConnectors = (f: FamilyRow) => m.Connector.findAll({ where: { familyId: f.id, componentId: { [Op.not]: null } }, order: [["id", "ASC"]] });
const pinsOf = (c: ConnectorRow) => m.Pin.findAll({ where: { connectorId: c.id }, order: [["position", "ASC"]] });

/** Another colour code already used in the family (so it certainly parses in the family's notation), different from `code`. */
async function otherCode(f: FamilyRow, ...not: (string | null)[]): Promise<string> {
  const pins = await m.Pin.findAll({ where: { familyId: f.id, colourCode: { [Op.not]: null } }, order: [["id", "ASC"]] });
  const code = pins.map((p) => p.colourCode!).find((c) => !not.includes(c));
  if (!code) throw new Error(`${f.slug}: no second colour code to swap in`);
  return code;
}

/** Only the family under test may be reported: a fault must not spill into other families' results. */
function expectOnly(problems: string[], f: FamilyRow) {
  expect(problems.length, `${f.slug}: the fault was not reported`).toBeGreaterThan(0);
  for (const p of problems) expect(p.startsWith(`${f.slug}: `), p).toBe(true);
}

// ---------------------------------------------------------------------------------------------------------------------

describe("the seeded demo library", () => {
  it("is consistent: checkLibrary() returns no problems", async () => {
    expect(await checkLibrary()).toEqual([]);
  });

  it("has ≥ 3 makes, ≥ 6 families, ≥ 40 connectors and ≥ 250 connector pins", async () => {
    expect(await m.Make.count()).toBeGreaterThanOrEqual(3);
    expect(await m.Family.count()).toBeGreaterThanOrEqual(6);
    expect(await m.Connector.count()).toBeGreaterThanOrEqual(40);
    expect(await m.Pin.count({ where: { connectorId: { [Op.not]: null } } })).toBeGreaterThanOrEqual(250);
    expect(await m.Wire.count()).toBeGreaterThan(0);
  });

  it("every family has a circuit with slug ignition", async () => {
    expect(families.length).toBeGreaterThanOrEqual(6);
    for (const f of families) expect(await m.Circuit.count({ where: { familyId: f.id, slug: "ignition" } }), f.slug).toBe(1);
  });
});

describe("faults the check must report (each injected, checked, undone)", () => {
  const each = it.for(["rx750-four", "rx400-four", "b800-boxer", "b1000-boxer", "sovereign-650", "marquis-500"]);
  const fam = (slug: string) => {
    const f = families.find((x) => x.slug === slug);
    if (!f) throw new Error(`family ${slug} not seeded`);
    return f;
  };

  each("(a) %s: one end of a wire changes colour → the wire and that end disagree", async (slug) => {
    const f = fam(slug);
    // A wire between two loom-side cavities (no splice, no bare terminal), so both ends are connector pins.
    const pins = new Map((await m.Pin.findAll({ where: { familyId: f.id } })).map((p) => [p.id, p]));
    const wires = await m.Wire.findAll({ where: { familyId: f.id }, order: [["id", "ASC"]] });
    const wire = wires.find((w) => pins.get(w.fromPinId)?.connectorId && pins.get(w.toPinId)?.connectorId);
    expect(wire, `${slug}: a loom-to-loom wire`).toBeDefined();
    const end = pins.get(wire!.fromPinId)!;
    const conn = (await m.Connector.findByPk(end.connectorId!))!;
    const was = end.colourCode;
    const now = await otherCode(f, was, wire!.colourCode);
    const problems = await withFault(async () => {
      await end.update({ colourCode: now });
      return () => end.update({ colourCode: was });
    });
    expectOnly(problems, f);
    expect(problems).toContain(`${slug}: wire #${wire!.id} is ${wire!.colourCode} but ${conn.slug} cavity ${end.cavity} says ${now}`);
    expect(
      problems.some((p) => /does not parse/.test(p)),
      "a valid code must not be reported as unparseable",
    ).toBe(false);
  });

  each("(b) %s: a pin moved to a cavity the housing does not have", async (slug) => {
    const f = fam(slug);
    const conn = (await loomConnectors(f))[0];
    const pin = (await pinsOf(conn))[0];
    const was = pin.cavity;
    const problems = await withFault(async () => {
      await pin.update({ cavity: "99" });
      return () => pin.update({ cavity: was });
    });
    expectOnly(problems, f);
    expect(problems).toContain(`${slug}: ${conn.slug}: cavity 99 does not exist in the housing`);
  });

  each("(c) %s: a colour code that does not parse in the family's notation (Zz)", async (slug) => {
    const f = fam(slug);
    const conn = (await loomConnectors(f))[0];
    const pin = (await pinsOf(conn)).find((p) => p.colourCode)!;
    const was = pin.colourCode;
    const problems = await withFault(async () => {
      await pin.update({ colourCode: "Zz" });
      return () => pin.update({ colourCode: was });
    });
    expectOnly(problems, f);
    expect(
      problems.some((p) => p.startsWith(`${slug}: colour "Zz" does not parse in the family's notation (${f.colourSystem})`)),
      problems.join("\n"),
    ).toBe(true);
  });

  it("(c) rx750-four: a code of another Japanese-style house (Bl) does not parse in its make's house, jis-letters", async () => {
    // REFERENCE-FACTS 1.3 [from memory]: jis-letters writes B black, L blue; Bl is another house's (REFERENCE-FACTS 5).
    const f = fam("rx750-four");
    const conn = (await loomConnectors(f))[0];
    const pin = (await pinsOf(conn)).find((p) => p.colourCode)!;
    const was = pin.colourCode;
    const problems = await withFault(async () => {
      await pin.update({ colourCode: "Bl" });
      return () => pin.update({ colourCode: was });
    });
    expectOnly(problems, f);
    expect(
      problems.some((p) => p.startsWith(`rx750-four: colour "Bl" does not parse in the family's notation (jis)`) && p.includes("jis-letters")),
      problems.join("\n"),
    ).toBe(true);
  });

  each("(d) %s: deleting any one wire of the kill-run net breaks the ignition circuit → does not close", async (slug) => {
    const f = fam(slug);
    // The kill-run net: "ignition feed after the kill switch" (or "… kill button" on the British twins), db/seeders/demo/templates.ts.
    const killRun = await m.Pin.findAll({ where: { familyId: f.id, circuit: { [Op.like]: "ignition feed after the kill%" } } });
    const ids = killRun.map((p) => p.id);
    const wires = await m.Wire.findAll({ where: { familyId: f.id, [Op.or]: [{ fromPinId: ids }, { toPinId: ids }] }, order: [["id", "ASC"]] });
    expect(wires.length, `${slug}: kill-run wires`).toBeGreaterThan(0);
    for (const wire of wires) {
      const row = wire.get({ plain: true });
      const problems = await withFault(async () => {
        await wire.destroy();
        return () => m.Wire.create(row);
      });
      expectOnly(problems, f);
      expect(
        problems.some((p) => p.startsWith(`${slug}: circuit ignition does not close through `)),
        `without wire #${row.id}:\n${problems.join("\n")}`,
      ).toBe(true);
    }
  });

  each("(e) %s: the two halves of a mated pair disagree on a cavity's colour", async (slug) => {
    const f = fam(slug);
    // The component side carries no wire of its own, so only the mate comparison can notice.
    const owner = (await ownerConnectors(f))[0];
    const mate = (await m.Connector.findByPk(owner.matesWithId!))!;
    const pin = (await pinsOf(owner)).find((p) => p.colourCode)!;
    const was = pin.colourCode;
    const now = await otherCode(f, was);
    const problems = await withFault(async () => {
      await pin.update({ colourCode: now });
      return () => pin.update({ colourCode: was });
    });
    expectOnly(problems, f);
    expect(problems).toEqual(
      expect.arrayContaining([
        `${slug}: ${owner.slug} cavity ${pin.cavity} is ${now} but ${mate.slug} says ${was}`,
        `${slug}: ${mate.slug} cavity ${pin.cavity} is ${was} but ${owner.slug} says ${now}`,
      ]),
    );
  });

  it("after all the faults the library checks clean again", async () => {
    expect(await checkLibrary()).toEqual([]);
  });
});

// ---------------------------------------------------------------------------------------------------------------------

describe("the CLI: npx tsx app/cli.server.ts setup | check", () => {
  const cliDir = mkdtempSync(path.join(tmpdir(), "loomlore-cli-"));
  const cliDb = path.join(cliDir, "cli.sqlite");
  const cli = (...args: string[]) =>
    spawnSync("npx", ["tsx", "app/cli.server.ts", ...args], { cwd: root, env: { ...process.env, DB_PATH: cliDb }, encoding: "utf8", timeout: 60_000 });

  afterAll(() => rmSync(cliDir, { recursive: true, force: true }));

  it("setup then check → exit 0, 'consistent'; after a fault → exit 1 naming it", async () => {
    const setup = cli("setup");
    expect(setup.status, setup.stderr).toBe(0);
    expect(setup.stdout).toContain(cliDb);

    const ok = cli("check");
    expect(ok.status, ok.stderr).toBe(0);
    expect(ok.stdout).toMatch(/consistent/);

    // Fault from outside the CLI's process: the ignition unit's loom plug loses its cavity 1 to a cavity the housing lacks.
    await execSql(
      cliDb,
      `UPDATE pins SET cavity = '99' WHERE cavity = '1'
      AND connector_id = (SELECT id FROM connectors WHERE slug = 'rx750-four-ignition-unit-plug')`,
    );
    const bad = cli("check");
    expect(bad.status, bad.stdout + bad.stderr).toBe(1);
    expect(bad.stderr).toContain("rx750-four: rx750-four-ignition-unit-plug: cavity 99 does not exist in the housing");
    expect(bad.stdout).toMatch(/\d+ problem\(s\) in the library/);
    expect(bad.stdout).not.toMatch(/consistent/);
  }, 120_000);
});
