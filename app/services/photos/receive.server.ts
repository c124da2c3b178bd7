/** Receiving a photo upload: the multipart body streamed and counted, every file checked, processed and stored, or none. */
import { randomUUID } from "node:crypto";
import path from "node:path";
// The error classes must come from form-data-parser, which bundles its own copy of the multipart parser (STACK.md gotcha 12).
import { MaxFileSizeExceededError, MaxFilesExceededError, MaxHeaderSizeExceededError, parseFormData, type FileUpload } from "@mjackson/form-data-parser";
import { sequelize } from "~db/index.server.ts";
import { Photo, Submission } from "~db/models/index.ts";
import { rejectionMessage, sniffImage, SNIFF_BYTES } from "~/domain/image-sniff";
import { photoUrls } from "~/domain/photo-urls";
import { can, type Role } from "~/domain/roles";
import { takeUpload } from "../rate-limit.server";
import { diskFull, isDiskFull, PhotoError } from "./errors.server";
import { crashAt } from "./faults.server";
import { checkLimits, KiB, MAX_BODY_BYTES, mb, PHOTO_LICENCE, PHOTO_LIMITS } from "./limits.server";
import { processOne, type Processed, type Received } from "./process.server";
import { ensureDirs, inFlight, removeAll, TMP_DIR, writeTmp } from "./storage.server";

/** A photo as stored: its id (also its file name), URLs, sizes and the text that goes with it. */
export interface StoredPhoto {
  id: string;
  url: string;
  thumbUrl: string;
  width: number;
  height: number;
  thumbWidth: number;
  thumbHeight: number;
  bytes: number;
  caption: string;
  credit: string;
  originalName: string;
  submissionId: number | null;
}

/** Count the body as it streams and cut it off at the limits (never buffering it whole). */
function countedBody(source: ReadableStream<Uint8Array>, counts: { read: number; fileBytes: number }, declared: number | null) {
  const reader = source.getReader();
  const halfway = declared && declared > 0 ? declared / 2 : 1;
  // Text fields are buffered by the parser: keep what is not a file to one file's worth plus the text allowance.
  const nonFileCap = PHOTO_LIMITS.maxBytes + PHOTO_LIMITS.textBytes + 192 * KiB;
  const stream = new ReadableStream<Uint8Array>(
    {
      async pull(controller) {
        const { done, value } = await reader.read();
        if (done) {
          controller.close();
          return;
        }
        counts.read += value.byteLength;
        if (counts.read > MAX_BODY_BYTES) {
          controller.error(tooLarge());
          reader.cancel().catch(() => {});
          return;
        }
        if (declared !== null && counts.read > declared) {
          controller.error(new PhotoError(400, "bad_request", "The body is longer than its Content-Length."));
          reader.cancel().catch(() => {});
          return;
        }
        if (counts.read - counts.fileBytes > nonFileCap) {
          controller.error(new PhotoError(413, "too_large", `The form's text may be at most ${PHOTO_LIMITS.textBytes / KiB} KiB.`));
          reader.cancel().catch(() => {});
          return;
        }
        if (counts.read >= halfway) crashAt("mid-body");
        controller.enqueue(value);
      },
      cancel(reason) {
        return reader.cancel(reason);
      },
    },
    { highWaterMark: 0 },
  );
  return { stream, cancel: () => reader.cancel().catch(() => {}) };
}

const tooLarge = () =>
  new PhotoError(413, "too_large", `An upload may carry at most ${PHOTO_LIMITS.perRequest} photos of ${mb(PHOTO_LIMITS.maxBytes)} each.`, "photo", {
    Connection: "close",
  });

/** Remove control and bidi-override characters, cut to `max` characters: safe to keep as text, never used as a path. */
function cleanName(name: string, max = 200): string {
  // eslint-disable-next-line no-control-regex -- control characters are what this checks for
  const cleaned = name.replace(/[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069]/g, "");
  return Array.from(cleaned).slice(0, max).join("");
}

// The same normalisation the submission editor applies (app/validation/submissions.ts): one line, no control chars.
function cleanLine(value: string, max: number, field: string): string {
  const s = value
    // eslint-disable-next-line no-control-regex -- control characters are what this checks for
    .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/g, "")
    .replace(/[\t\r\n]+/g, " ")
    .trim();
  if (s.length > max) throw new PhotoError(400, "bad_request", `The ${field} may be at most ${max} characters.`, field);
  return s;
}

/** Errors from our own code inside the parser's upload handler, to tell them apart from malformed bodies. */
class HandlerFailure extends Error {
  constructor(readonly original: unknown) {
    super("upload handler failed");
  }
}

function parseFailure(e: unknown): unknown {
  if (e instanceof PhotoError) return e;
  if (e instanceof HandlerFailure) return isDiskFull(e.original) ? diskFull(e.original) : e.original;
  if (e instanceof MaxFileSizeExceededError)
    return new PhotoError(413, "too_large", `Each photo may be at most ${mb(PHOTO_LIMITS.maxBytes)}.`, "photo", { Connection: "close" });
  if (e instanceof MaxFilesExceededError)
    return new PhotoError(413, "too_large", `Send at most ${PHOTO_LIMITS.perRequest} photos at a time.`, "photo", { Connection: "close" });
  if (e instanceof MaxHeaderSizeExceededError) return new PhotoError(400, "bad_request", "A part of the form has headers longer than 8 KiB.");
  if (isDiskFull(e)) return diskFull(e);
  // MultipartParseError, FormDataParseError, a TypeError from undecodable UTF-8 in a part, a body the client broke off:
  // all mean the body was not a form we can read.
  return new PhotoError(400, "bad_request", "The upload could not be read as a multipart/form-data form. Please try again.");
}

/**
 * Receive a photo upload (field `photo`, one or more files; `caption`, `credit`, `consent`, optional `submission`):
 * validate, process and store every file, or none. Returns the stored photos and the form's other text fields.
 * Throws PhotoError for everything the client should hear about.
 */
export async function receivePhotos(
  request: Request,
  user: { id: number; role: string },
  opts: { submissionId?: number } = {},
): Promise<{ photos: StoredPhoto[]; fields: Record<string, string> }> {
  if (!can(user.role as Role, "submission.create"))
    throw new PhotoError(403, "forbidden", "Confirm your e-mail address first: contributing needs a verified address.");
  const type = request.headers.get("Content-Type") ?? "";
  const boundary = /^multipart\/form-data\s*;/i.test(type) ? /;\s*boundary=(?:"([^"]+)"|([^;\s]+))/i.exec(type) : null;
  const b = boundary ? (boundary[1] ?? boundary[2]) : null;
  if (!b) throw new PhotoError(415, "unsupported_media_type", "Send the photos as a file form (multipart/form-data with a boundary).");
  if (b.length > 70) throw new PhotoError(400, "bad_request", "The form's boundary is longer than 70 characters (RFC 2046).");
  const declaredHeader = request.headers.get("Content-Length");
  const declared = declaredHeader !== null && /^\d+$/.test(declaredHeader.trim()) ? Number(declaredHeader) : null;
  if (declared !== null && declared > MAX_BODY_BYTES) throw tooLarge();
  if (!request.body) throw new PhotoError(400, "bad_request", "The upload is empty: choose at least one photo.", "photo");
  const limited = await takeUpload(user.id, PHOTO_LIMITS.perMinute);
  if (!limited.ok) {
    throw new PhotoError(429, "rate_limited", `At most ${PHOTO_LIMITS.perMinute} uploads a minute: wait ${limited.retryAfterS} s and try again.`, undefined, {
      "Retry-After": String(limited.retryAfterS),
    });
  }
  await ensureDirs();

  const counts = { read: 0, fileBytes: 0 };
  const body = countedBody(request.body, counts, declared);
  const written = new Set<string>();
  const ids: string[] = [];
  const received: Received[] = [];
  try {
    let form: FormData;
    const handler = async (file: FileUpload) => {
      counts.fileBytes += file.size;
      if (file.fieldName !== "photo") return null;
      // A file input left empty still sends a part: no name, no bytes. That is "no photo", not a broken one.
      if (file.size === 0 && file.name === "") return null;
      try {
        const sniffed = sniffImage(new Uint8Array(await file.slice(0, SNIFF_BYTES).arrayBuffer()));
        if (!sniffed.ok) {
          if (sniffed.format === "empty") throw new PhotoError(422, "unprocessable", "The file is empty.", "photo");
          throw new PhotoError(415, "unsupported_media_type", rejectionMessage(sniffed.format), "photo");
        }
        if (sniffed.animated) throw new PhotoError(422, "unprocessable", "Animated images are not accepted: upload a still photo.", "photo");
        const id = randomUUID();
        inFlight.add(id);
        ids.push(id);
        const tmp = path.join(TMP_DIR, `${id}.part`);
        written.add(tmp);
        await writeTmp(tmp, file);
        crashAt("after-tmp");
        received.push({ id, tmp, kind: sniffed.kind, originalName: cleanName(file.name) });
        return id;
      } catch (e) {
        throw e instanceof PhotoError ? e : new HandlerFailure(e);
      }
    };
    try {
      const parsed = new Request(request.url, {
        method: "POST",
        headers: { "Content-Type": `multipart/form-data; boundary=${b}` },
        body: body.stream,
        duplex: "half",
      } as RequestInit & { duplex: "half" });
      form = await parseFormData(parsed, { maxFileSize: PHOTO_LIMITS.maxBytes, maxFiles: PHOTO_LIMITS.perRequest, maxHeaderSize: 8 * KiB }, handler);
    } catch (e) {
      await body.cancel();
      throw parseFailure(e);
    }

    // The text fields: ours, and the rest for the caller (a page action's `intent`, `version` …).
    const fields: Record<string, string> = {};
    let fieldCount = 0;
    let textBytes = 0;
    for (const [name, value] of form.entries()) {
      if (name === "photo" || typeof value !== "string") continue;
      fieldCount++;
      textBytes += value.length + name.length;
      fields[name] = value;
    }
    if (fieldCount > PHOTO_LIMITS.maxFields) throw new PhotoError(400, "bad_request", `The form has more than ${PHOTO_LIMITS.maxFields} fields.`);
    if (textBytes > PHOTO_LIMITS.textBytes) throw new PhotoError(413, "too_large", `The form's text may be at most ${PHOTO_LIMITS.textBytes / KiB} KiB.`);
    if (received.length === 0) throw new PhotoError(400, "bad_request", "Choose at least one photo (JPEG, PNG or WebP).", "photo");
    const caption = cleanLine(fields.caption ?? "", 200, "caption");
    const credit = cleanLine(fields.credit ?? "", 120, "credit");
    if (!/^(yes|on|true)$/i.test((fields.consent ?? "").trim())) {
      throw new PhotoError(400, "bad_request", `Tick the box to confirm you took these photos or may share them, under ${PHOTO_LICENCE}.`, "consent");
    }
    let submissionId: number | null = opts.submissionId ?? null;
    if (submissionId === null && (fields.submission ?? "").trim() !== "") {
      const s = fields.submission.trim();
      if (!/^\d{1,12}$/.test(s) || Number(s) < 1) throw new PhotoError(400, "bad_request", "The submission must be a submission's number.", "submission");
      submissionId = Number(s);
    }
    for (const k of ["caption", "credit", "consent", "submission"]) delete fields[k];

    // Cheap checks before the expensive work; the transaction below checks again, authoritatively.
    await checkLimits(user.id, submissionId, received.length, 0);
    const processed: Processed[] = [];
    for (const u of received) processed.push(await processOne(u, written));

    const now = new Date();
    const rows = await sequelize.transaction(async (transaction) => {
      const total = processed.reduce((n, p) => n + p.bytes, 0);
      // Counted in the same IMMEDIATE transaction as the insert: parallel uploads cannot race past a quota (ASVS 5.0 V15.4.2).
      const submission = await checkLimits(user.id, submissionId, processed.length, total, transaction);
      const start = submission ? await Photo.count({ where: { submissionId: submission.id }, transaction }) : 0;
      const created = processed.map((p, i) => ({
        id: p.id,
        ownerId: user.id,
        submissionId: submission?.id ?? null,
        connectorId: null,
        position: start + i,
        caption,
        credit,
        licence: PHOTO_LICENCE,
        consentAt: now,
        originalName: p.originalName,
        width: p.width,
        height: p.height,
        thumbWidth: p.thumbWidth,
        thumbHeight: p.thumbHeight,
        bytes: p.bytes,
        createdAt: now,
        removedAt: null,
      }));
      await Photo.bulkCreate(created, { transaction });
      crashAt("mid-insert");
      if (submission) {
        const content = (submission.content ?? {}) as { photos?: { id: string; caption: string; credit: string }[] };
        const photos = [...(Array.isArray(content.photos) ? content.photos : []), ...created.map((c) => ({ id: c.id, caption, credit }))];
        const [n] = await Submission.update(
          { content: { ...content, photos }, version: submission.version + 1, updatedAt: now },
          { where: { id: submission.id, version: submission.version }, transaction },
        );
        if (n !== 1) throw new PhotoError(409, "conflict", "The submission changed while the photos were uploading: reload it and try again.", "submission");
      }
      return created;
    });
    return {
      photos: rows.map((r) => ({
        id: r.id,
        ...photoUrls(r.id),
        width: r.width,
        height: r.height,
        thumbWidth: r.thumbWidth,
        thumbHeight: r.thumbHeight,
        bytes: r.bytes,
        caption: r.caption,
        credit: r.credit,
        originalName: r.originalName,
        submissionId: r.submissionId,
      })),
      fields,
    };
  } catch (e) {
    await removeAll(written);
    if (e instanceof PhotoError) throw e;
    if (isDiskFull(e)) throw diskFull(e);
    if (/SQLITE_BUSY/.test(String((e as Error)?.message))) {
      throw new PhotoError(503, "unavailable", "The library is busy right now, so nothing was saved: please try again in a moment.", undefined, {
        "Retry-After": "2",
      });
    }
    throw e;
  } finally {
    for (const id of ids) inFlight.delete(id);
  }
}
