/** The command line (a composition root beside the server: it may use db/ and the services alike): `tsx app/cli.server.ts migrate|seed|setup|reset|check|create-admin|sweep-photos|search-reindex|search-reconcile`. */
import { rmSync } from "node:fs";
import { databasePath, sequelize } from "../db/index.server.ts";
import { migrateUp } from "../db/migrate.ts";
import { setupDatabase } from "../db/setup.ts";
import { checkLibrary } from "../db/check.ts";
import { Make, User } from "../db/models/index.ts";
import { passwordProblem } from "./domain/passwords.ts";
import { hashPassword } from "./infra/password-hash.server.ts";
import { seedDemo } from "../db/seeders/demo.ts";
import { env } from "./env.server.ts";
import { NO_WORKERS, startApp, stopApp } from "./startup.server.ts";

const command = process.argv[2];
try {
  if (command === "migrate") {
    const done = await migrateUp();
    console.log(done.length ? `applied ${done.map((m) => m.name).join(", ")}` : "schema up to date");
  } else if (command === "seed") {
    await migrateUp();
    if ((await Make.count()) > 0) console.log("library not empty: seed skipped (npm run db:reset starts over)");
    else {
      await seedDemo();
      console.log("demo library seeded");
    }
  } else if (command === "setup") {
    const seeded = await setupDatabase({ seed: env.SEED_DEMO });
    console.log(`database ready at ${databasePath()}${seeded ? " (demo library seeded)" : ""}`);
  } else if (command === "reset") {
    await sequelize.close();
    for (const suffix of ["", "-wal", "-shm"]) rmSync(databasePath() + suffix, { force: true });
    console.log(`removed ${databasePath()}; run npm run db:seed or npm start to rebuild it`);
  } else if (command === "check") {
    await migrateUp();
    const problems = await checkLibrary();
    for (const p of problems) console.error(`✗ ${p}`);
    console.log(problems.length ? `${problems.length} problem(s) in the library` : "library consistent: wires, cavities, colours and circuits check out");
    process.exitCode = problems.length ? 1 : 0;
  } else if (command === "create-admin") {
    // For a real deployment, where no demo accounts exist: ADMIN_PASSWORD=… tsx app/cli.server.ts create-admin email "Name"
    const [email, name] = [process.argv[3]?.trim().toLowerCase(), process.argv[4]?.trim()];
    const password = process.env.ADMIN_PASSWORD ?? "";
    const problem = passwordProblem(password, { email, displayName: name });
    if (!email || !name || problem) {
      console.error(`usage: ADMIN_PASSWORD=… tsx app/cli.server.ts create-admin <email> <display name>${problem ? `\n${problem}` : ""}`);
      process.exitCode = 2;
    } else {
      await migrateUp();
      const now = new Date();
      const [user, created] = await User.findOrCreate({
        where: { email },
        defaults: {
          email,
          displayName: name,
          role: "admin",
          passwordHash: await hashPassword(password, undefined, { wait: true }),
          emailVerifiedAt: now,
          passwordChangedAt: now,
          createdAt: now,
          disabledAt: null,
        },
      });
      if (!created) await user.update({ role: "admin" });
      console.log(`${email} is an admin${created ? " (new account)" : ""}`);
    }
  } else if (command === "sweep-photos") {
    // Leftovers of interrupted uploads (uploads/tmp older than 1 h, unreferenced photo files older than 24 h).
    await migrateUp();
    const { sweepPhotos, UPLOADS_DIR } = await import("./services/photos.server.ts");
    const r = await sweepPhotos();
    console.log(`${UPLOADS_DIR}: removed ${r.tmpRemoved} temporary, ${r.partsRemoved} partial and ${r.orphansRemoved} unreferenced file(s); kept ${r.kept}`);
  } else if (command === "search-reindex" || command === "search-reconcile") {
    // Rebuild the search service's index (and the database's own full-text copy) from the library, or repair drift:
    // the app started without its workers (this command does the one job and exits).
    await startApp({ workers: NO_WORKERS });
    const search = await import("./services/search.server.ts");
    if (command === "search-reindex") console.log(`search index rebuilt: ${(await search.reindexAll()).documents} documents`);
    else console.log(`search index reconciled: ${JSON.stringify(await search.reconcile())}`);
  } else {
    console.error("usage: tsx app/cli.server.ts migrate|seed|setup|reset|check|create-admin|sweep-photos|search-reindex|search-reconcile");
    process.exitCode = 2;
  }
} finally {
  await stopApp().catch(() => {});
}
