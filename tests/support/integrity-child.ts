/**
 * Child processes for the data-integrity suite (tests/integration/integrity.test.ts, QUALITY.md §2 and F9/F10). Each is a
 * real second process on the parent's SQLite file (DB_PATH from the environment), so its connections contend for the
 * same locks as another app process would.
 *
 *   node --import tsx tests/support/integrity-child.ts '<json>'
 *
 * Modes (json.mode):
 *   contend   D2/D10: `count` read-then-write IMMEDIATE transactions through the app's Sequelize instance, each reading
 *             a submission's version, bumping it with the conditional `UPDATE … WHERE id = ? AND version = ?` and
 *             inserting an audit row (`action`). Prints `ready`, waits for `go` on stdin, prints `result <json>`.
 *   batches   D5: writes card revisions in batches until killed. One transaction per batch: the rig connector's
 *             revision read and bumped, its 20 pin rows replaced, one audit row with the batch checksum. Prints
 *             `ready`, waits for `go`, then `begin <k>` inside each transaction and `committed <k>` after its commit.
 *   hold      F9: a plain sqlite3 connection takes `BEGIN IMMEDIATE`, prints `held`, keeps it `ms`, commits, prints
 *             `released`.
 *   migrate   F10: the app's migrator: `start`, then `migrating <name>` / `migrated <name>`, `done` at the end. With
 *             `hangAtLog: <name>` it stops for good (until killed) between that migration's commit and umzug recording it
 *             in SequelizeMeta. With `setup` it then runs the rest of the app's start (setupDatabase, no demo seed).
 *   walwriter F10: commits `rows` audit rows through a plain connection with auto-checkpoint off, prints `committed`,
 *             and waits to be killed (leaving a hot WAL for the next start to recover).
 *   card      D5: a fresh app process reads a connector card with the app's service; prints `result <json>`.
 *
 * The batch content is a pure function of the batch number, exported for the parent's checks.
 */
import { createHash } from "node:crypto";
import { pathToFileURL } from "node:url";

/** D5: the rig connector's 20 cavities. */
export const RIG_CAVITIES = Array.from({ length: 20 }, (_, i) => String(i + 1));
const CODES = ["B", "W", "R", "G", "Y", "L", "O", "Br", "B/W", "R/W", "G/Y", "L/W", "Y/R", "W/L"];

/** D5: the 20 pin rows batch `k` writes (a pure function of k, so the parent can recompute every batch). */
export function batchPins(k: number) {
  return RIG_CAVITIES.map((cavity, position) => ({ cavity, colourCode: CODES[(k * 7 + position * 3) % CODES.length], circuit: `batch ${k}`, position }));
}

/** D5: the checksum stored in batch k's audit row, over the connector revision and the pin rows as written. */
export function batchChecksum(k: number, pins: { cavity: string; colourCode: string | null; circuit: string; position: number }[] = batchPins(k)) {
  const h = createHash("sha256").update(`revision ${k}\n`);
  for (const p of pins) h.update(`${p.cavity}|${p.colourCode}|${p.circuit}|${p.position}\n`);
  return h.digest("hex");
}

const write = (line: string) => new Promise<void>((resolve) => process.stdout.write(line + "\n", () => resolve()));

/** Resolves when the parent writes `go` on stdin. */
function waitForGo(): Promise<void> {
  return new Promise((resolve) => {
    let buf = "";
    process.stdin.setEncoding("utf8");
    process.stdin.on("data", (chunk: string) => {
      buf += chunk;
      if (buf.includes("go")) resolve();
    });
  });
}

const errorCode = (e: unknown) =>
  (e as { parent?: { code?: string } })?.parent?.code ?? (e as { original?: { code?: string } })?.original?.code ?? (e as { code?: string })?.code;

async function contend(cfg: { submissionId: number; count: number; worker: number; action: string }) {
  const { sequelize } = await import("../../db/index.server.ts");
  const { Submission, AuditLog } = await import("../../db/models/index.ts");
  await sequelize.query("SELECT 1"); // the shared handle is open before the start signal
  await write("ready");
  await waitForGo();
  const waits: number[] = [];
  const durations: number[] = [];
  let busy = 0;
  let conflicts = 0;
  const errors: string[] = [];
  const started = performance.now();
  for (let i = 0; i < cfg.count; i++) {
    const t0 = performance.now();
    try {
      await sequelize.transaction(async (transaction) => {
        // From the call to the first statement inside: opening the handle and BEGIN IMMEDIATE waiting for the lock.
        waits.push(performance.now() - t0);
        const s = await Submission.findByPk(cfg.submissionId, { attributes: ["id", "version"], transaction, rejectOnEmpty: true });
        const [n] = await Submission.update({ version: s.version + 1 }, { where: { id: s.id, version: s.version }, transaction });
        if (n !== 1) conflicts++;
        await AuditLog.create(
          {
            actorId: null,
            action: cfg.action,
            subjectType: "submission",
            subjectId: String(s.id),
            detail: JSON.stringify({ worker: cfg.worker, i }),
            at: new Date(),
          },
          { transaction },
        );
      });
    } catch (e) {
      if (errorCode(e) === "SQLITE_BUSY") busy++;
      else errors.push(String((e as Error)?.message ?? e));
    }
    durations.push(performance.now() - t0);
  }
  const elapsed = performance.now() - started;
  await write(`result ${JSON.stringify({ worker: cfg.worker, waits, durations, busy, conflicts, errors, elapsed })}`);
  await sequelize.close();
}

async function batches(cfg: { connectorId: number; familyId: number }) {
  const { sequelize } = await import("../../db/index.server.ts");
  const { AuditLog, Connector, Pin } = await import("../../db/models/index.ts");
  await write("ready");
  await waitForGo();
  for (;;) {
    const k = await sequelize.transaction(async (transaction) => {
      const c = await Connector.findByPk(cfg.connectorId, { attributes: ["id", "revision"], transaction, rejectOnEmpty: true });
      const k = c.revision + 1;
      await write(`begin ${k}`);
      const pins = batchPins(k);
      await Connector.update({ revision: k, notes: `Crash rig, batch ${k}.` }, { where: { id: c.id }, transaction });
      await Pin.destroy({ where: { connectorId: c.id }, transaction });
      for (const p of pins) await Pin.create({ familyId: cfg.familyId, connectorId: c.id, componentId: null, terminal: null, ...p }, { transaction });
      await AuditLog.create(
        {
          actorId: null,
          action: "crash.batch",
          subjectType: "connector",
          subjectId: String(c.id),
          detail: JSON.stringify({ batch: k, checksum: batchChecksum(k, pins) }),
          at: new Date(),
        },
        { transaction },
      );
      return k;
    });
    await write(`committed ${k}`);
  }
}

async function rawDb(file: string) {
  const sqlite3 = (await import("sqlite3")).default;
  const db = await new Promise<import("sqlite3").Database>((resolve, reject) => {
    const d = new sqlite3.Database(file, (err) => (err ? reject(err) : resolve(d)));
  });
  const exec = (sql: string) => new Promise<void>((resolve, reject) => db.exec(sql, (err) => (err ? reject(err) : resolve())));
  return { db, exec };
}

async function hold(cfg: { ms: number }) {
  const { db, exec } = await rawDb(process.env.DB_PATH!);
  await exec("BEGIN IMMEDIATE");
  await write("held");
  await new Promise((resolve) => setTimeout(resolve, cfg.ms));
  await exec("COMMIT");
  await write("released");
  await new Promise<void>((resolve) => db.close(() => resolve()));
}

async function migrate(cfg: { hangAtLog?: string; setup?: boolean }) {
  if (cfg.hangAtLog) {
    const { SequelizeStorage } = await import("umzug");
    const log = SequelizeStorage.prototype.logMigration;
    // The crash window of interest: the migration's own transaction has committed, SequelizeMeta has no row for it yet.
    SequelizeStorage.prototype.logMigration = async function (this: InstanceType<typeof SequelizeStorage>, params: { name: string }) {
      if (params.name !== cfg.hangAtLog) return log.call(this, params as never);
      await write(`logging ${params.name}`);
      await new Promise(() => {}); // until SIGKILL
    };
  }
  const { migrator } = await import("../../db/migrate.ts");
  const { sequelize } = await import("../../db/index.server.ts");
  const u = migrator();
  u.on("migrating", ({ name }) => void write(`migrating ${name}`));
  u.on("migrated", ({ name }) => void write(`migrated ${name}`));
  await write("start");
  await u.up();
  // The rest of the app's start (db/setup.ts), without the demo seed.
  if (cfg.setup) await (await import("../../db/setup.ts")).setupDatabase({ seed: false });
  await write("done");
  await sequelize.close();
}

async function walwriter(cfg: { rows: number }) {
  const { exec } = await rawDb(process.env.DB_PATH!);
  await exec("PRAGMA journal_mode = WAL; PRAGMA wal_autocheckpoint = 0");
  let sql = "BEGIN IMMEDIATE;";
  for (let i = 0; i < cfg.rows; i++)
    sql += `INSERT INTO audit_log (actor_id, action, subject_type, subject_id, detail, at) VALUES (NULL, 'f10.probe', 'test', '${i}', '{}', '2026-12-01 00:00:00.000 +00:00');`;
  await exec(sql + "COMMIT;");
  await write("committed");
  await new Promise(() => {}); // until SIGKILL: the WAL keeps the commit, uncheckpointed
}

async function card(cfg: { slug: string }) {
  const { getConnectorCard } = await import("../../app/services/library.server.ts");
  const c = await getConnectorCard(cfg.slug);
  await write(
    `result ${JSON.stringify(c ? { slug: c.connector.slug, revision: c.connector.revision.number, notes: c.connector.notes, pins: c.connector.pins.map((p) => ({ cavity: p.cavity, code: p.colour.code, circuit: p.circuit })) } : null)}`,
  );
  const { sequelize } = await import("../../db/index.server.ts");
  await sequelize.close();
  process.exit(0);
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const cfg = JSON.parse(process.argv[2] ?? "{}");
  const modes: Record<string, (c: never) => Promise<void>> = { contend, batches, hold, migrate, walwriter, card };
  const fn = modes[cfg.mode as string];
  if (!fn) throw new Error(`integrity-child: unknown mode ${cfg.mode}`);
  await fn(cfg as never);
}
