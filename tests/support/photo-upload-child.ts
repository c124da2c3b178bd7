/**
 * A child process for the photo crash tests (tests/integration/photo-crash.test.ts, QUALITY D6/F1): it performs
 * uploads in-process with receivePhotos and is SIGKILLed, either by the pipeline's own crash hook (the test-faults seam) or by the parent
 * part-way through a body streamed in on stdin.
 *
 *   node --import tsx tests/support/photo-upload-child.ts '<json>'
 *   json = { userId, role, contentType, jobs: [{ body: "<file>" | "stdin", length, crashAt? }] }
 *
 * Jobs run one after another. Output lines on stdout: `ready <job>` before a stdin body is read, `read <bytes>` as
 * it arrives, `result <json>` after each job ({job, status, ids, message}). DB_PATH and UPLOADS_DIR come from the
 * environment (the parent's test database and upload directory).
 */
import { readFileSync } from "node:fs";
import { Readable } from "node:stream";

interface Job {
  body: string;
  length: number;
  crashAt?: string;
}
const config = JSON.parse(process.argv[2] ?? "{}") as { userId: number; role: string; contentType: string; jobs: Job[] };

const { receivePhotos, PhotoError } = await import("../../app/services/photos.server.ts");
const { setFaults } = await import("../../app/infra/faults.server.ts"); // the pipeline's crash points (test-only seam)
const write = (line: string) => new Promise<void>((resolve) => process.stdout.write(line + "\n", () => resolve()));

/** stdin as a web stream that reports how much has arrived. */
function stdinBody(): ReadableStream<Uint8Array> {
  let read = 0;
  const source = Readable.toWeb(process.stdin) as ReadableStream<Uint8Array>;
  return source.pipeThrough(
    new TransformStream<Uint8Array, Uint8Array>({
      async transform(chunk, controller) {
        read += chunk.byteLength;
        await write(`read ${read}`);
        controller.enqueue(chunk);
      },
    }),
  );
}

for (const [i, job] of config.jobs.entries()) {
  setFaults(job.crashAt ? { crashAt: job.crashAt } : {});
  let body: BodyInit;
  if (job.body === "stdin") {
    await write(`ready ${i}`);
    body = stdinBody();
  } else body = readFileSync(job.body);
  const request = new Request("http://127.0.0.1/api/v1/photos", {
    method: "POST",
    headers: { "Content-Type": config.contentType, "Content-Length": String(job.length) },
    body,
    duplex: "half",
  } as RequestInit & { duplex: "half" });
  try {
    const { photos } = await receivePhotos(request, { id: config.userId, role: config.role });
    await write(`result ${JSON.stringify({ job: i, status: 201, ids: photos.map((p) => p.id) })}`);
  } catch (e) {
    if (!(e instanceof PhotoError)) throw e;
    await write(`result ${JSON.stringify({ job: i, status: e.status, message: e.message })}`);
  }
}
const { sequelize } = await import("../../db/index.server.ts");
await sequelize.close();
