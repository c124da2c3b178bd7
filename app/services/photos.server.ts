/**
 * The photo pipeline: multipart upload → uploads/tmp/<uuid>.part → sharp (pixel cap, only the JPEG/PNG/WebP decoders,
 * orientation applied, every piece of metadata dropped) → WebP display size and thumbnail written as .part, fsynced,
 * renamed into uploads/photos/ → one IMMEDIATE transaction checks the quotas and inserts the rows. Files are served
 * only through routes/photos.$file.ts, by id, to those allowed to see them.
 *
 * Crash safety (QUALITY D6): a reader can only ever find complete files under photos/<uuid>.webp (rename is atomic);
 * a row is inserted only after its files are durable; whatever a crash leaves behind (tmp/*, *.part, files without a
 * row) is removed by sweepPhotos once it is old enough that no upload can still be working on it.
 *
 * Test-only hooks (never set them in production):
 * - CRASH_AT=mid-body|after-tmp|mid-sharp|after-rename|mid-insert: SIGKILL this process at that point of an upload.
 * - UPLOAD_FAULT=enospc:<n>: the n-th file write after the variable was set (or changed) fails with ENOSPC.
 */
import { randomBytes, randomUUID } from "node:crypto";
import { lstat, mkdir, open, readdir, rename, rm } from "node:fs/promises";
import { availableParallelism } from "node:os";
import path from "node:path";
// The error classes must come from form-data-parser, which bundles its own copy of the multipart parser (STACK.md gotcha 12).
import { MaxFileSizeExceededError, MaxFilesExceededError, MaxHeaderSizeExceededError, parseFormData, type FileUpload } from "@mjackson/form-data-parser";
import sharp, { type Metadata, type OutputInfo } from "sharp";
import { Op, type Transaction } from "sequelize";
import { sequelize } from "~db/index.server.ts";
import { Photo, Submission } from "~db/models/index.ts";
import { rejectionMessage, sniffImage, SNIFF_BYTES, type AcceptedKind } from "~/domain/image-sniff";
import { photoUrls } from "~/domain/photo-urls";
import { can, type Role } from "~/domain/roles";
import { ensureDatabase } from "./database.server";
import { apiError, type ApiErrorCode } from "./http.server";
import { takeUpload } from "./rate-limit.server";

const KiB = 1024;
const MiB = 1024 * KiB;
const HOUR = 3600_000;

function envInt(name: string, fallback: number): number {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v > 0 ? Math.floor(v) : fallback;
}

/** Upload limits (QUALITY "Open choices": 15 MB per photo, 12 per submission, 50 MP pixel cap); env overrides. */
export const PHOTO_LIMITS = Object.freeze({
  /** Bytes per uploaded file (PHOTO_MAX_BYTES). */
  maxBytes: envInt("PHOTO_MAX_BYTES", 15 * MiB),
  /** Photos on one submission. */
  perSubmission: envInt("PHOTO_PER_SUBMISSION", 12),
  /** Files in one request. */
  perRequest: envInt("PHOTO_PER_REQUEST", 12),
  /** Photos one contributor may keep (PHOTO_USER_COUNT). */
  perUserCount: envInt("PHOTO_USER_COUNT", 60),
  /** Stored bytes (display + thumbnail) one contributor may keep (PHOTO_USER_BYTES). */
  perUserBytes: envInt("PHOTO_USER_BYTES", 200 * MiB),
  /** Upload requests per user per minute (PHOTO_PER_MINUTE; ASVS V11.1.4). */
  perMinute: envInt("PHOTO_PER_MINUTE", 20),
  /**
   * Decoded pixels per image, checked from the header before decoding (ASVS 5.0 V5.2.6 "pixel flood"). QUALITY.md
   * suggests 50 MP; sharp's own default, 268 402 689 (0x3FFF²), is far more than any phone photo needs.
   */
  maxPixels: envInt("PHOTO_MAX_PIXELS", 50_000_000),
  /** Long edge of the display size and of the thumbnail, in pixels. */
  displayEdge: 1600,
  thumbEdge: 320,
  /** Text fields in one request, and their total size. */
  maxFields: 50,
  textBytes: 64 * KiB,
});

/** The whole body may not exceed this: every file at its limit plus 64 KiB for the text fields and part headers. */
export const MAX_BODY_BYTES = PHOTO_LIMITS.perRequest * PHOTO_LIMITS.maxBytes + 64 * KiB;

/** The licence every photo is shared under; the contributor consents to it on upload. */
export const PHOTO_LICENCE = "CC BY-SA 4.0";
export const PHOTO_LICENCE_URL = "https://creativecommons.org/licenses/by-sa/4.0/";

/** Where uploads live (UPLOADS_DIR, default ./uploads): tmp/ for bodies in flight, photos/ for processed files. */
export const UPLOADS_DIR = path.resolve(process.env.UPLOADS_DIR ?? path.join(process.cwd(), "uploads"));
export const TMP_DIR = path.join(UPLOADS_DIR, "tmp");
export const PHOTOS_DIR = path.join(UPLOADS_DIR, "photos");

const UUID = "[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}";
const SERVED_NAME = new RegExp(`^(${UUID})(\\.thumb)?\\.webp$`);
const PHOTO_FILE = new RegExp(`^(${UUID})(\\.thumb)?\\.webp(\\.part)?$`);
const TMP_FILE = new RegExp(`^(${UUID})\\.part$`);

// Only the three accepted decoders may run (sharp docs, api-utility: block/unblock "for defining a list of allowed
// operations"). Blocking the VipsForeignLoad base class blocks every loader libvips has or will have (svg, tiff, heif,
// gif, pdf, magick, openslide, fits, matrix, csv, raw, vips, ppm, rad, jp2k, jxl, analyze …); then the allow-list.
const ACCEPTED_FORMATS = ["jpeg", "png", "webp"] as const;
export const ALLOWED_LOADERS = ["Jpeg", "Png", "Webp"].flatMap((f) => ["File", "Buffer", "Source"].map((s) => `VipsForeignLoad${f}${s}`));
sharp.block({ operation: ["VipsForeignLoad"] });
sharp.unblock({ operation: ALLOWED_LOADERS });
for (const f of ACCEPTED_FORMATS) {
  if (!sharp.format[f]?.input.file) throw new Error(`this sharp build cannot read ${f}: the photo pipeline cannot run`);
}

const DECODE = { limitInputPixels: PHOTO_LIMITS.maxPixels, failOn: "warning", pages: 1 } as const;

/** An upload refused or failed in a way the client should hear about: status, API error code, message, field. */
export class PhotoError extends Error {
  constructor(readonly status: number, readonly code: ApiErrorCode, message: string, readonly field?: string, readonly headers?: Record<string, string>) {
    super(message);
    this.name = "PhotoError";
  }
}

/** A PhotoError as the API's one error shape; anything else is rethrown (it is a bug, and becomes a 500). */
export function photoErrorResponse(e: unknown): Response {
  if (e instanceof PhotoError) return apiError(e.status, e.code, e.message, e.field, e.headers);
  throw e;
}

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

// The public addresses of a photo's display size and thumbnail: one definition, shared with the client.
export { photoUrls };

// ---- test hooks -------------------------------------------------------------------------------------------------

type CrashPoint = "mid-body" | "after-tmp" | "mid-sharp" | "after-rename" | "mid-insert";
function crashAt(point: CrashPoint) {
  if (process.env.CRASH_AT === point) process.kill(process.pid, "SIGKILL");
}

let faultSpec: string | undefined;
let faultWrites = 0;
/** UPLOAD_FAULT=enospc:<n>: the error the n-th file write should fail with (counting restarts when the value changes). */
function writeFault(): NodeJS.ErrnoException | null {
  const spec = process.env.UPLOAD_FAULT;
  if (spec !== faultSpec) {
    faultSpec = spec;
    faultWrites = 0;
  }
  const m = spec ? /^enospc:(\d+)$/.exec(spec) : null;
  if (!m) return null;
  if (++faultWrites !== Number(m[1])) return null;
  return Object.assign(new Error("ENOSPC: no space left on device, write (UPLOAD_FAULT)"), { code: "ENOSPC", errno: -28, syscall: "write" });
}

// ---- files ------------------------------------------------------------------------------------------------------

/** Ids of uploads this process is working on: the sweeper leaves their files alone whatever their age. */
const inFlight = new Set<string>();

async function ensureDirs() {
  await mkdir(TMP_DIR, { recursive: true });
  await mkdir(PHOTOS_DIR, { recursive: true });
}

function isDiskFull(e: unknown): boolean {
  const err = e as { code?: string; message?: string; parent?: { code?: string } } | null;
  return !!err && (err.code === "ENOSPC" || err.code === "EDQUOT" || err.parent?.code === "SQLITE_FULL" || /SQLITE_FULL/.test(err.message ?? ""));
}

/** 507 with a plain message; the log line and the message share an error id (ASVS V7.4.1). */
function diskFull(e: unknown): PhotoError {
  const id = randomBytes(4).toString("hex");
  const err = e as { code?: string; message?: string };
  console.error(`[photos] error ${id}: no space to store an upload (${err.code ?? "SQLITE_FULL"}: ${err.message ?? e})`);
  return new PhotoError(507, "insufficient_storage", `The server has no room for photos right now, so nothing was saved. Please try again later (error id ${id}).`, "photo");
}

/** Stream an uploaded part to a new temporary file (never fsynced: a crash just leaves it for the sweeper). */
async function writeTmp(dest: string, file: Blob) {
  const fh = await open(dest, "wx", 0o600);
  try {
    const fault = writeFault();
    const reader = file.stream().getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      await fh.write(value);
      if (fault) throw fault;
    }
    if (fault) throw fault;
  } finally {
    await fh.close();
  }
}

/** Write a new file and fsync it (before it is renamed into place). */
async function writeDurable(dest: string, data: Buffer) {
  const fh = await open(dest, "wx", 0o644);
  try {
    const fault = writeFault();
    if (fault) {
      await fh.write(data.subarray(0, Math.min(data.length, 4096)));
      throw fault;
    }
    await fh.writeFile(data);
    await fh.sync();
  } finally {
    await fh.close();
  }
}

/** fsync a directory, so renames in it survive a power cut (rename is atomic, not durable). */
async function syncDir(dir: string) {
  const fh = await open(dir, "r");
  try {
    await fh.sync();
  } finally {
    await fh.close();
  }
}

async function removeAll(files: Iterable<string>) {
  await Promise.all([...files].map((f) => rm(f, { force: true }).catch(() => {})));
}

// At most this many sharp pipelines at once: sharp, sqlite3 and bcrypt share libuv's pool (QUALITY P5).
const PIPELINES = envInt("PHOTO_PIPELINES", Math.max(1, availableParallelism() - 1));
let activePipelines = 0;
const waitingPipelines: (() => void)[] = [];
async function withPipeline<T>(work: () => Promise<T>): Promise<T> {
  if (activePipelines < PIPELINES) activePipelines++;
  else await new Promise<void>((resolve) => waitingPipelines.push(resolve));
  try {
    return await work();
  } finally {
    const next = waitingPipelines.shift();
    if (next) next();
    else activePipelines--;
  }
}

// ---- the request body -------------------------------------------------------------------------------------------

/** Count the body as it streams and cut it off at the limits (never buffering it whole). */
function countedBody(source: ReadableStream<Uint8Array>, counts: { read: number; fileBytes: number }, declared: number | null) {
  const reader = source.getReader();
  const halfway = declared && declared > 0 ? declared / 2 : 1;
  // Text fields are buffered by the parser: keep what is not a file to one file's worth plus the text allowance.
  const nonFileCap = PHOTO_LIMITS.maxBytes + PHOTO_LIMITS.textBytes + 192 * KiB;
  const stream = new ReadableStream<Uint8Array>({
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
  }, { highWaterMark: 0 });
  return { stream, cancel: () => reader.cancel().catch(() => {}) };
}

const mb = (n: number) => `${Math.round((n / MiB) * 10) / 10} MB`;
const tooLarge = () => new PhotoError(413, "too_large",
  `An upload may carry at most ${PHOTO_LIMITS.perRequest} photos of ${mb(PHOTO_LIMITS.maxBytes)} each.`, "photo", { Connection: "close" });

/** Remove control and bidi-override characters, cut to `max` characters: safe to keep as text, never used as a path. */
function cleanName(name: string, max = 200): string {
  const cleaned = name.replace(/[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069]/g, "");
  return Array.from(cleaned).slice(0, max).join("");
}

// The same normalisation the submission editor applies (app/validation/submissions.ts): one line, no control chars.
function cleanLine(value: string, max: number, field: string): string {
  const s = value.replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/g, "").replace(/[\t\r\n]+/g, " ").trim();
  if (s.length > max) throw new PhotoError(400, "bad_request", `The ${field} may be at most ${max} characters.`, field);
  return s;
}

interface Received { id: string; tmp: string; kind: AcceptedKind; originalName: string }
interface Processed extends Received { width: number; height: number; thumbWidth: number; thumbHeight: number; bytes: number }

/** Errors from our own code inside the parser's upload handler, to tell them apart from malformed bodies. */
class HandlerFailure extends Error {
  constructor(readonly original: unknown) {
    super("upload handler failed");
  }
}

function parseFailure(e: unknown): unknown {
  if (e instanceof PhotoError) return e;
  if (e instanceof HandlerFailure) return isDiskFull(e.original) ? diskFull(e.original) : e.original;
  if (e instanceof MaxFileSizeExceededError) return new PhotoError(413, "too_large", `Each photo may be at most ${mb(PHOTO_LIMITS.maxBytes)}.`, "photo", { Connection: "close" });
  if (e instanceof MaxFilesExceededError) return new PhotoError(413, "too_large", `Send at most ${PHOTO_LIMITS.perRequest} photos at a time.`, "photo", { Connection: "close" });
  if (e instanceof MaxHeaderSizeExceededError) return new PhotoError(400, "bad_request", "A part of the form has headers longer than 8 KiB.");
  if (isDiskFull(e)) return diskFull(e);
  // MultipartParseError, FormDataParseError, a TypeError from undecodable UTF-8 in a part, a body the client broke off:
  // all mean the body was not a form we can read.
  return new PhotoError(400, "bad_request", "The upload could not be read as a multipart/form-data form. Please try again.");
}

/** Decode with the limits, re-encode as WebP (display + thumbnail), write both durably, rename them into place. */
async function processOne(u: Received, written: Set<string>): Promise<Processed> {
  return withPipeline(async () => {
    let meta: Metadata;
    try {
      meta = await sharp(u.tmp, DECODE).metadata();
    } catch (e) {
      throw unreadable(e);
    }
    if (meta.format !== u.kind) throw new PhotoError(422, "unprocessable", "The file's contents do not match its own header: it looks damaged.", "photo");
    if ((meta.pages ?? 1) > 1) throw new PhotoError(422, "unprocessable", "Animated images are not accepted: upload a still photo.", "photo");
    if (!meta.width || !meta.height || meta.width * meta.height > PHOTO_LIMITS.maxPixels) throw pixelFlood();
    const edge = { fit: "inside", withoutEnlargement: true } as const;
    let display: { data: Buffer; info: OutputInfo };
    try {
      // No withMetadata/keepExif: sharp's output drops EXIF (GPS, serial numbers), XMP, IPTC and ICC by default;
      // autoOrient first, or portrait photos would come out on their side.
      display = await sharp(u.tmp, DECODE).autoOrient().resize({ width: PHOTO_LIMITS.displayEdge, height: PHOTO_LIMITS.displayEdge, ...edge })
        .webp({ quality: 82 }).toBuffer({ resolveWithObject: true });
    } catch (e) {
      throw unreadable(e);
    }
    const displayPart = path.join(PHOTOS_DIR, `${u.id}.webp.part`);
    const thumbPart = path.join(PHOTOS_DIR, `${u.id}.thumb.webp.part`);
    const displayFinal = path.join(PHOTOS_DIR, `${u.id}.webp`);
    const thumbFinal = path.join(PHOTOS_DIR, `${u.id}.thumb.webp`);
    written.add(displayPart);
    await writeDurable(displayPart, display.data);
    crashAt("mid-sharp");
    const thumb = await sharp(display.data, DECODE).resize({ width: PHOTO_LIMITS.thumbEdge, height: PHOTO_LIMITS.thumbEdge, ...edge })
      .webp({ quality: 75 }).toBuffer({ resolveWithObject: true })
      .catch((e: unknown) => { throw unreadable(e); });
    written.add(thumbPart);
    await writeDurable(thumbPart, thumb.data);
    written.add(displayFinal).add(thumbFinal);
    await rename(displayPart, displayFinal);
    await rename(thumbPart, thumbFinal);
    written.delete(displayPart);
    written.delete(thumbPart);
    await syncDir(PHOTOS_DIR);
    crashAt("after-rename");
    await rm(u.tmp, { force: true });
    written.delete(u.tmp);
    return { ...u, width: display.info.width, height: display.info.height, thumbWidth: thumb.info.width, thumbHeight: thumb.info.height, bytes: display.data.length + thumb.data.length };
  });
}

const pixelFlood = () => new PhotoError(422, "unprocessable",
  `The image is too large to process: at most ${PHOTO_LIMITS.maxPixels / 1_000_000} megapixels. Resize it and try again.`, "photo");

function unreadable(e: unknown): PhotoError {
  if (e instanceof PhotoError) return e;
  if (/exceeds pixel limit/i.test(String((e as Error)?.message))) return pixelFlood();
  return new PhotoError(422, "unprocessable", "The image could not be read: it looks truncated or damaged. Export it again as JPEG and retry.", "photo");
}

// ---- limits -----------------------------------------------------------------------------------------------------

/** Quotas and the submission's rules for adding `count` photos of `bytes` stored bytes; returns the submission. */
async function checkLimits(userId: number, submissionId: number | null, count: number, bytes: number, transaction?: Transaction) {
  const mine = { ownerId: userId, removedAt: null };
  const [have, used] = await Promise.all([
    Photo.count({ where: mine, transaction }),
    Photo.sum("bytes", { where: mine, transaction }).then((n) => Number(n ?? 0)),
  ]);
  if (have + count > PHOTO_LIMITS.perUserCount) {
    throw new PhotoError(429, "rate_limited", `You can keep at most ${PHOTO_LIMITS.perUserCount} photos and have ${have}: remove some from your drafts first.`, "photo");
  }
  if (used + bytes > PHOTO_LIMITS.perUserBytes) {
    throw new PhotoError(413, "too_large", `Your photos may take at most ${mb(PHOTO_LIMITS.perUserBytes)} in all and already take ${mb(used)}: remove some from your drafts first.`, "photo");
  }
  if (submissionId === null) return null;
  const submission = await Submission.findByPk(submissionId, { transaction });
  // Someone else's submission answers exactly like a missing one (QUALITY S2: no existence leak).
  if (!submission || submission.authorId !== userId) throw new PhotoError(404, "not_found", "There is no such submission of yours.", "submission");
  if (submission.state !== "draft" && submission.state !== "returned") {
    throw new PhotoError(409, "conflict", "This submission is with the moderators or decided: photos can only be added to a draft or a returned submission.", "submission");
  }
  const onIt = await Photo.count({ where: { submissionId, removedAt: null }, transaction });
  if (onIt + count > PHOTO_LIMITS.perSubmission) {
    throw new PhotoError(429, "rate_limited", `A submission can have at most ${PHOTO_LIMITS.perSubmission} photos; this one has ${onIt}.`, "photo");
  }
  return submission;
}

// ---- receiving --------------------------------------------------------------------------------------------------

/**
 * Receive a photo upload (field `photo`, one or more files; `caption`, `credit`, `consent`, optional `submission`):
 * validate, process and store every file, or none. Returns the stored photos and the form's other text fields.
 * Throws PhotoError for everything the client should hear about.
 */
export async function receivePhotos(request: Request, user: { id: number; role: string }, opts: { submissionId?: number } = {}):
  Promise<{ photos: StoredPhoto[]; fields: Record<string, string> }> {
  if (!can(user.role as Role, "submission.create")) throw new PhotoError(403, "forbidden", "Confirm your e-mail address first: contributing needs a verified address.");
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
    throw new PhotoError(429, "rate_limited", `At most ${PHOTO_LIMITS.perMinute} uploads a minute: wait ${limited.retryAfterS} s and try again.`, undefined,
      { "Retry-After": String(limited.retryAfterS) });
  }
  await ensureDatabase();
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
        id: p.id, ownerId: user.id, submissionId: submission?.id ?? null, connectorId: null, position: start + i, caption, credit,
        licence: PHOTO_LICENCE, consentAt: now, originalName: p.originalName, width: p.width, height: p.height,
        thumbWidth: p.thumbWidth, thumbHeight: p.thumbHeight, bytes: p.bytes, createdAt: now, removedAt: null,
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
        id: r.id, ...photoUrls(r.id), width: r.width, height: r.height, thumbWidth: r.thumbWidth, thumbHeight: r.thumbHeight, bytes: r.bytes,
        caption: r.caption, credit: r.credit, originalName: r.originalName, submissionId: r.submissionId,
      })),
      fields,
    };
  } catch (e) {
    await removeAll(written);
    if (e instanceof PhotoError) throw e;
    if (isDiskFull(e)) throw diskFull(e);
    if (/SQLITE_BUSY/.test(String((e as Error)?.message))) {
      throw new PhotoError(503, "unavailable", "The library is busy right now, so nothing was saved: please try again in a moment.", undefined, { "Retry-After": "2" });
    }
    throw e;
  } finally {
    for (const id of ids) inFlight.delete(id);
  }
}

// ---- serving ----------------------------------------------------------------------------------------------------

/**
 * The file behind /photos/<file> if `viewer` may see it: a published photo (on a card) to anyone; any other only to
 * its owner and to moderators. Anything else is null, answered with 404, so a draft's existence does not leak.
 */
export async function photoForViewer(file: string, viewer: { id: number; role: string } | null): Promise<{ path: string; published: boolean } | null> {
  const m = SERVED_NAME.exec(file);
  if (!m) return null;
  await ensureDatabase();
  const row = await Photo.findByPk(m[1], { attributes: ["id", "ownerId", "connectorId", "removedAt"] });
  if (!row || row.removedAt) return null;
  const published = row.connectorId != null;
  const allowed = published || (!!viewer && (viewer.id === row.ownerId || can(viewer.role as Role, "review.work")));
  return allowed ? { path: path.join(PHOTOS_DIR, file), published } : null;
}

// ---- sweeping ---------------------------------------------------------------------------------------------------

export interface SweepResult { tmpRemoved: number; partsRemoved: number; orphansRemoved: number; removedSwept: number; kept: number }

async function existingIds(ids: string[]): Promise<Set<string>> {
  const found = new Set<string>();
  for (let i = 0; i < ids.length; i += 500) {
    const rows = await Photo.findAll({ where: { id: { [Op.in]: ids.slice(i, i + 500) } }, attributes: ["id"] });
    for (const r of rows) found.add(r.id);
  }
  return found;
}

/** How old each file is (ms since its last change), null for one that is gone; stat'ed 64 at a time. */
async function agesOf(files: string[], now: number): Promise<(number | null)[]> {
  const ages: (number | null)[] = [];
  for (let i = 0; i < files.length; i += 64) {
    ages.push(...await Promise.all(files.slice(i, i + 64).map((f) => lstat(f).then((st) => now - st.mtimeMs, () => null))));
  }
  return ages;
}

/**
 * Remove what interrupted uploads leave behind: tmp/* older than tmpAgeMs (1 h), photos/*.part older than tmpAgeMs,
 * and photos/ files without a Photo row older than orphanAgeMs (24 h). A file whose row exists is never removed
 * (checked again right before unlinking), nor one an upload in this process is working on; and the files of photos
 * whose row is marked removed and is on no card. Idempotent.
 */
export async function sweepPhotos(opts: { now?: Date; tmpAgeMs?: number; orphanAgeMs?: number } = {}): Promise<SweepResult> {
  const now = (opts.now ?? new Date()).getTime();
  const tmpAge = opts.tmpAgeMs ?? HOUR;
  const orphanAge = opts.orphanAgeMs ?? 24 * HOUR;
  const result: SweepResult = { tmpRemoved: 0, partsRemoved: 0, orphansRemoved: 0, removedSwept: 0, kept: 0 };
  await ensureDirs();

  const tmp: { file: string; id?: string }[] = [];
  for (const name of await readdir(TMP_DIR)) {
    const id = TMP_FILE.exec(name)?.[1];
    if (id && inFlight.has(id)) result.kept++;
    else tmp.push({ file: path.join(TMP_DIR, name), id });
  }
  const tmpAges = await agesOf(tmp.map((t) => t.file), now);
  for (const [i, t] of tmp.entries()) {
    if (tmpAges[i] === null || tmpAges[i]! < tmpAge || (t.id && inFlight.has(t.id))) {
      result.kept++;
      continue;
    }
    await rm(t.file, { force: true, recursive: true });
    result.tmpRemoved++;
  }

  // In-flight first, then the row: an upload that is no longer in flight has either committed its row or removed its files.
  const listed = (await readdir(PHOTOS_DIR)).flatMap((name) => {
    const m = PHOTO_FILE.exec(name);
    if (!m) return []; // not ours (e.g. .gitkeep): left alone
    if (inFlight.has(m[1])) {
      result.kept++;
      return [];
    }
    return [{ file: path.join(PHOTOS_DIR, name), id: m[1], part: !!m[3] }];
  });
  const photoAges = await agesOf(listed.map((c) => c.file), now);
  const candidates = listed.filter((c, i) => {
    const old = photoAges[i] !== null && photoAges[i]! >= (c.part ? tmpAge : orphanAge);
    if (!old) result.kept++;
    return old;
  });
  const rows = await existingIds([...new Set(candidates.filter((c) => !c.part).map((c) => c.id))]);
  const orphans = candidates.filter((c) => c.part || !rows.has(c.id));
  result.kept += candidates.length - orphans.length;
  // Right before unlinking, look again: never remove a file whose row exists.
  const recheck = await existingIds([...new Set(orphans.filter((c) => !c.part).map((c) => c.id))]);
  for (const c of orphans) {
    if (inFlight.has(c.id) || (!c.part && recheck.has(c.id))) {
      result.kept++;
      continue;
    }
    await rm(c.file, { force: true });
    if (c.part) result.partsRemoved++;
    else result.orphansRemoved++;
  }

  // Photos removed from a draft (or a declined submission): the row stays, marked; its files go, whatever their age.
  const removed = await Photo.findAll({ where: { removedAt: { [Op.ne]: null }, connectorId: null }, attributes: ["id"] });
  const removedIds = new Set(removed.map((r) => r.id));
  for (const c of listed) {
    if (c.part || !removedIds.has(c.id) || inFlight.has(c.id)) continue;
    await rm(c.file, { force: true });
    result.removedSwept++;
  }
  return result;
}

/**
 * Delete the files of photos whose rows are marked removed and on no card (called once the removal has committed; a
 * crash before it leaves them to sweepPhotos). Returns how many files went.
 */
export async function deleteRemovedPhotoFiles(ids: string[]): Promise<number> {
  if (!ids.length) return 0;
  const rows = await Photo.findAll({ where: { id: { [Op.in]: ids }, removedAt: { [Op.ne]: null }, connectorId: null }, attributes: ["id"] });
  let n = 0;
  for (const r of rows) {
    for (const file of [`${r.id}.webp`, `${r.id}.thumb.webp`]) {
      await rm(path.join(PHOTOS_DIR, file), { force: true });
      n++;
    }
  }
  return n;
}

let sweeper: NodeJS.Timeout | null = null;

/** Sweep now and then hourly (an unref'd timer: it never keeps the process alive). PHOTO_SWEEPER=off leaves it out. */
export function startPhotoSweeper(): void {
  if (sweeper || process.env.PHOTO_SWEEPER === "off") return;
  const run = () => void sweepPhotos().catch((e) => console.error(`[photos] sweep failed: ${(e as Error)?.message ?? e}`));
  run();
  sweeper = setInterval(run, HOUR);
  sweeper.unref();
}
