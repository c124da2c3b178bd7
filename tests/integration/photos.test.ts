/**
 * The photo pipeline in-process (app/services/photos.server.ts and its two routes): QUALITY.md S11, S12, S2 (photos),
 * F4, F5, F6, F8 and D7. DB_PATH and UPLOADS_DIR point at a temporary directory before any app module is imported
 * (the Sequelize instance reads DB_PATH at import). Requests are real `Request` objects with multipart bodies, most
 * built by hand so that malformed ones can be made too. This suite needs no production build.
 */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { randomUUID } from "node:crypto";
import zlib from "node:zlib";
import exifr from "exifr";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { mulberry32, pick } from "../fixtures/random";

type Photos = typeof import("../../app/services/photos.server.ts");
type Models = typeof import("../../db/models/index.ts");
type FileRoute = typeof import("../../app/routes/photos.$file.ts");
type ApiRoute = typeof import("../../app/routes/api.v1.photos.ts");
type User = { id: number; role: string };

const dir = mkdtempSync(path.join(tmpdir(), "loomlore-photos-"));
const dbPath = path.join(dir, "photos.sqlite");
const uploads = path.join(dir, "uploads");

let P: Photos;
let m: Models;
let fileRoute: FileRoute;
let faults: typeof import("../../app/infra/faults.server.ts"); // the disk-full hook (test-only seam)
let apiRoute: ApiRoute;
let closeDb: () => Promise<void>;
let startSession: (request: Request, userId: number) => Promise<string>;
let demo: { contributor: User; moderator: User };

beforeAll(async () => {
  process.env.DB_PATH = dbPath;
  process.env.UPLOADS_DIR = uploads;
  process.env.MAIL_WORKER = "off";
  process.env.PHOTO_SWEEPER = "off";
  process.env.SMTP_URL = "smtp://127.0.0.1:1";
  delete process.env.SEED_DEMO;
  faults = await import("../../app/infra/faults.server.ts");
  faults.setFaults({});
  const db = await import("../../db/index.server.ts");
  expect(db.databasePath()).toBe(dbPath); // not a Sequelize instance left over from another import
  closeDb = () => db.sequelize.close();
  P = await import("../../app/services/photos.server.ts");
  expect(P.UPLOADS_DIR).toBe(uploads);
  await (await import("../../db/setup.ts")).setupDatabase(); // migrate and seed the demo accounts
  m = await import("../../db/models/index.ts");
  fileRoute = await import("../../app/routes/photos.$file.ts");
  apiRoute = await import("../../app/routes/api.v1.photos.ts");
  const auth = await import("../../app/services/auth.server.ts");
  startSession = auth.startSession;
  const find = async (email: string) => {
    const u = await m.User.findOne({ where: { email } });
    expect(u, `demo account ${email}`).toBeTruthy();
    return { id: u!.id, role: u!.role };
  };
  demo = { contributor: await find("contributor@loomlore.invalid"), moderator: await find("moderator@loomlore.invalid") };
}, 60_000);

afterAll(async () => {
  await closeDb?.();
  rmSync(dir, { recursive: true, force: true });
});

// ---- fixtures ---------------------------------------------------------------------------------------------------

let userSeq = 0;
/** A new verified contributor: each scenario gets its own, so per-user quotas and rate limits start at zero. */
async function contributor(role = "contributor"): Promise<User> {
  const now = new Date();
  userSeq++;
  const u = await m.User.create({
    email: `photo-tester-${userSeq}-${randomUUID().slice(0, 8)}@loomlore.invalid`,
    displayName: `Photo tester ${userSeq}`,
    role: role as "contributor",
    passwordHash: "not-a-hash",
    emailVerifiedAt: now,
    passwordChangedAt: now,
    createdAt: now,
    disabledAt: null,
  });
  return { id: u.id, role: u.role };
}

const jpegCache = new Map<string, Buffer>();
/** A noisy JPEG from seeded pixels (noise so the encoder has real work and mutations hit entropy-coded data; seeded so runs repeat). */
async function jpeg(width = 64, height = 48): Promise<Buffer> {
  const key = `${width}x${height}`;
  if (!jpegCache.has(key)) {
    const rnd = mulberry32(width * 100_000 + height);
    const pixels = Buffer.alloc(width * height * 3);
    for (let i = 0; i < pixels.length; i++) pixels[i] = 64 + Math.floor(rnd() * 128);
    jpegCache.set(
      key,
      await sharp(pixels, { raw: { width, height, channels: 3 } })
        .jpeg({ quality: 85 })
        .toBuffer(),
    );
  }
  return jpegCache.get(key)!;
}

interface Part {
  name?: string;
  filename?: string;
  type?: string;
  data: Buffer | string;
  rawHeaders?: string | Buffer;
}
const BOUNDARY = "----loomloreTestBoundary7MA4YWxkTrZu0gW";

/** A multipart/form-data body (RFC 7578), by hand so that tests can break it. */
function multipart(parts: Part[], boundary = BOUNDARY, close = true): Buffer {
  const chunks: Buffer[] = [];
  for (const p of parts) {
    const headers =
      p.rawHeaders ??
      [
        `Content-Disposition: form-data${p.name !== undefined ? `; name="${p.name}"` : ""}${p.filename !== undefined ? `; filename="${p.filename}"` : ""}`,
        ...(p.type ? [`Content-Type: ${p.type}`] : p.filename !== undefined ? ["Content-Type: image/jpeg"] : []),
      ].join("\r\n");
    chunks.push(
      Buffer.from(`--${boundary}\r\n`),
      Buffer.isBuffer(headers) ? headers : Buffer.from(headers),
      Buffer.from("\r\n\r\n"),
      Buffer.isBuffer(p.data) ? p.data : Buffer.from(p.data),
      Buffer.from("\r\n"),
    );
  }
  if (close) chunks.push(Buffer.from(`--${boundary}--\r\n`));
  return Buffer.concat(chunks);
}

const consent: Part = { name: "consent", data: "yes" };
const photoPart = (data: Buffer, filename = "connector.jpg", type = "image/jpeg"): Part => ({ name: "photo", filename, type, data });

function request(
  body: Buffer | ReadableStream<Uint8Array> | null,
  o: { contentType?: string | null; contentLength?: number | null; headers?: Record<string, string>; url?: string } = {},
) {
  const headers = new Headers(o.headers);
  const type = o.contentType === undefined ? `multipart/form-data; boundary=${BOUNDARY}` : o.contentType;
  if (type !== null) headers.set("Content-Type", type);
  const length = o.contentLength === undefined ? (Buffer.isBuffer(body) ? body.length : null) : o.contentLength;
  if (length !== null) headers.set("Content-Length", String(length));
  return new Request(o.url ?? "http://127.0.0.1/api/v1/photos", { method: "POST", headers, body, duplex: "half" } as RequestInit & { duplex: "half" });
}

interface Attempt {
  status: number;
  code?: string;
  message?: string;
  headers?: Record<string, string>;
  photos?: import("../../app/services/photos.server.ts").StoredPhoto[];
  fields?: Record<string, string>;
  ms: number;
}
/** Run receivePhotos; a PhotoError becomes its status. Anything else thrown fails the test (F5: no non-PhotoError). */
async function attempt(req: Request, user: User, opts?: { submissionId?: number }): Promise<Attempt> {
  const t0 = performance.now();
  try {
    const r = await P.receivePhotos(req, user, opts);
    return { status: 201, photos: r.photos, fields: r.fields, ms: performance.now() - t0 };
  } catch (e) {
    if (e instanceof P.PhotoError) return { status: e.status, code: e.code, message: e.message, headers: e.headers, ms: performance.now() - t0 };
    throw e;
  }
}
const uploadOne = async (user: User, data: Buffer, extra: Part[] = [], filename = "connector.jpg") =>
  attempt(request(multipart([photoPart(data, filename), consent, ...extra])), user);

const ls = (d: string) => (existsSync(d) ? readdirSync(d).sort() : []);
const tmpFiles = () => ls(P.TMP_DIR);
/** photos/ files that no Photo row accounts for (should always be empty between tests). */
async function strayPhotoFiles(): Promise<string[]> {
  const ids = new Set((await m.Photo.findAll({ attributes: ["id"] })).map((p) => p.id));
  return ls(P.PHOTOS_DIR).filter((f) => (f !== ".gitkeep" && !ids.has(f.slice(0, 36))) || f.endsWith(".part"));
}
async function expectNoLeftovers(what: string) {
  expect(tmpFiles(), `${what}: tmp/ is empty`).toEqual([]);
  expect(await strayPhotoFiles(), `${what}: no unreferenced or partial files in photos/`).toEqual([]);
}
const photoFile = (id: string, thumb = false) => path.join(P.PHOTOS_DIR, `${id}${thumb ? ".thumb" : ""}.webp`);

/** Insert rows without files to bring a user near a quota; returns a function that deletes them again. */
async function fakeRows(user: User, count: number, bytes = 1000): Promise<() => Promise<void>> {
  const now = new Date();
  const rows = Array.from({ length: count }, () => ({
    id: randomUUID(),
    ownerId: user.id,
    submissionId: null,
    licence: P.PHOTO_LICENCE,
    consentAt: now,
    width: 10,
    height: 10,
    thumbWidth: 10,
    thumbHeight: 10,
    bytes,
    createdAt: now,
  }));
  await m.Photo.bulkCreate(rows);
  return async () => {
    await m.Photo.destroy({ where: { id: rows.map((r) => r.id) } });
  };
}

async function draft(user: User, state = "draft") {
  const now = new Date();
  return m.Submission.create({
    authorId: user.id,
    kind: "new",
    familyId: null,
    connectorId: null,
    baseRevision: null,
    state,
    content: { name: "Test plug", photos: [] },
    idempotencyKey: null,
    createdAt: now,
    updatedAt: now,
  });
}

// PNG chunks by hand (PNG specification, 5.3 Chunk layout: length, type, data, CRC-32 over type+data).
function crc32(buf: Buffer): number {
  let crc = 0xffffffff;
  for (const byte of buf) {
    crc ^= byte;
    for (let k = 0; k < 8; k++) crc = crc & 1 ? 0xedb88320 ^ (crc >>> 1) : crc >>> 1;
  }
  return (crc ^ 0xffffffff) >>> 0;
}
function pngChunk(type: string, data: Buffer): Buffer {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, "latin1"), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([len, body, crc]);
}
/** A ~70-byte PNG whose IHDR declares width × height (a "pixel flood" / decompression bomb header). */
function pngBomb(width = 20_000, height = 20_000): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // truecolour
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    pngChunk("IHDR", ihdr),
    pngChunk("IDAT", zlib.deflateSync(Buffer.alloc(16))),
    pngChunk("IEND", Buffer.alloc(0)),
  ]);
}
/** A real JPEG whose SOF0 frame header is patched to declare width × height (ITU-T T.81, B.2.2: SOFn = FFC0, Lf, P, Y, X). */
function jpegBomb(src: Buffer, width = 60_000, height = 60_000): Buffer {
  const out = Buffer.from(src);
  for (let i = 2; i < out.length - 9; i++) {
    if (out[i] === 0xff && out[i + 1] >= 0xc0 && out[i + 1] <= 0xc2) {
      out.writeUInt16BE(height, i + 5);
      out.writeUInt16BE(width, i + 7);
      return out;
    }
  }
  throw new Error("no SOF marker");
}

// ---- S11 --------------------------------------------------------------------------------------------------------

describe("S11 upload hardening (ASVS 4.0.3 V12.x, OWASP File Upload Cheat Sheet, ASVS 5.0 V5.2.6)", () => {
  it("S11a: a .jpg name with HTML/JS content is refused by content (415), nothing stored", async () => {
    const user = await contributor();
    const r = await uploadOne(user, Buffer.from("<!DOCTYPE html><html><body><script>alert(document.cookie)</script></body></html>"), [], "photo.jpg");
    expect(r.status).toBe(415);
    expect(r.message).toMatch(/web page|JPEG/);
    expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(0);
    await expectNoLeftovers("S11a");
  });

  it("S11b: SVG, TIFF and HEIC are refused with 415 (HEIC told to export as JPEG) and their decoders are blocked in sharp", async () => {
    const user = await contributor();
    const svg = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script><rect width="10" height="10"/></svg>');
    const tiff = await sharp({ create: { width: 16, height: 16, channels: 3, background: "#3a6" } })
      .tiff()
      .toBuffer();
    // ISO/IEC 14496-12 ftyp box with the HEIF brand "heic" (ISO/IEC 23008-12), then junk.
    const heic = Buffer.concat([Buffer.from([0, 0, 0, 24]), Buffer.from("ftypheic\0\0\0\0mif1heic", "latin1"), Buffer.alloc(200, 7)]);
    const gif = await sharp({ create: { width: 16, height: 16, channels: 3, background: "#3a6" } })
      .gif()
      .toBuffer();
    for (const [name, data, re] of [
      ["x.svg", svg, /SVG/],
      ["x.tif", tiff, /TIFF/],
      ["IMG_0001.heic", heic, /export the photo as JPEG/],
      ["x.gif", gif, /GIF/],
    ] as const) {
      const r = await uploadOne(user, data, [], name);
      expect(r.status, name).toBe(415);
      expect(r.message, name).toMatch(re);
    }
    // Defence in depth: even if a file got past the sniffing, sharp in this process refuses to decode these formats
    // (sharp.block on the VipsForeignLoad base class, then unblock of the JPEG/PNG/WebP loaders only).
    const avif = await sharp({ create: { width: 16, height: 16, channels: 3, background: "#3a6" } })
      .avif()
      .toBuffer();
    for (const [name, data] of [
      ["svg", svg],
      ["tiff", tiff],
      ["gif", gif],
      ["heif/avif", avif],
    ] as const) {
      await expect(sharp(data).metadata(), name).rejects.toThrow(/unsupported image format/);
    }
    await expect(sharp(await jpeg()).metadata()).resolves.toMatchObject({ format: "jpeg" });
    expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(0);
    await expectNoLeftovers("S11b");
  });

  it("S11c: a JPEG with HTML appended (polyglot) is stored as a fresh WebP with no trailing bytes", async () => {
    const user = await contributor();
    const html = "<html><body><script>alert('polyglot')</script></body></html>";
    const r = await uploadOne(user, Buffer.concat([await jpeg(320, 240), Buffer.from(html)]));
    expect(r.status, r.message).toBe(201);
    for (const thumb of [false, true]) {
      const stored = readFileSync(photoFile(r.photos![0].id, thumb));
      // WebP Container Specification: "RIFF", a little-endian size of everything after those 8 bytes, "WEBP".
      expect(stored.subarray(0, 4).toString("latin1")).toBe("RIFF");
      expect(stored.subarray(8, 12).toString("latin1")).toBe("WEBP");
      expect(stored.readUInt32LE(4)).toBe(stored.length - 8);
      expect(stored.includes(Buffer.from("<script"))).toBe(false);
      expect((await sharp(stored).metadata()).format).toBe("webp");
    }
  });

  it("S11d: EXIF (GPS, serial), XMP and IPTC are gone from the stored files and the orientation is applied", async () => {
    const user = await contributor();
    const xmp =
      '<x:xmpmeta xmlns:x="adobe:ns:meta/"><rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#"><rdf:Description xmlns:dc="http://purl.org/dc/elements/1.1/"><dc:creator>Someone Private</dc:creator></rdf:Description></rdf:RDF></x:xmpmeta>';
    // STACK.md gotcha 14: withExif's Orientation is ignored, so withMetadata({orientation}) fakes a portrait phone photo.
    let input = await sharp({ create: { width: 640, height: 480, channels: 3, background: "#3a6" } })
      .withMetadata({ orientation: 6 })
      .withExif({
        IFD0: { Make: "TestCam", Model: "Unit 7", Copyright: "Private Person" },
        IFD2: { BodySerialNumber: "SN-0042-XYZ" },
        IFD3: { GPSLatitudeRef: "N", GPSLatitude: "51/1 30/1 0/1", GPSLongitudeRef: "W", GPSLongitude: "0/1 7/1 30/1" },
      })
      .withXmp(xmp)
      .jpeg()
      .toBuffer();
    // IPTC: an APP13 "Photoshop 3.0" segment with an 8BIM 0x0404 resource holding one IPTC record (2:120 caption),
    // spliced in after SOI (sharp cannot write IPTC itself).
    const record = Buffer.concat([Buffer.from([0x1c, 0x02, 0x78, 0x00, 0x0d]), Buffer.from("Home address!")]);
    const resource = Buffer.concat([Buffer.from("8BIM", "latin1"), Buffer.from([0x04, 0x04, 0, 0]), Buffer.alloc(4), record, Buffer.alloc(record.length % 2)]);
    resource.writeUInt32BE(record.length, 8);
    const app13Body = Buffer.concat([Buffer.from("Photoshop 3.0\0", "latin1"), resource]);
    const app13 = Buffer.concat([Buffer.from([0xff, 0xed]), Buffer.alloc(2), app13Body]);
    app13.writeUInt16BE(app13Body.length + 2, 2);
    input = Buffer.concat([input.subarray(0, 2), app13, input.subarray(2)]);
    const before = await sharp(input).metadata();
    expect(before.orientation).toBe(6);
    expect(before.exif && before.xmp && before.iptc, "the input really carries EXIF, XMP and IPTC").toBeTruthy();
    expect(await exifr.gps(input)).toMatchObject({ latitude: 51.5 });

    const r = await uploadOne(user, input);
    expect(r.status, r.message).toBe(201);
    expect(r.photos![0]).toMatchObject({ width: 480, height: 640 });
    for (const thumb of [false, true]) {
      const stored = readFileSync(photoFile(r.photos![0].id, thumb));
      const meta = await sharp(stored).metadata();
      // STACK.md gotcha 15: exifr cannot read WebP, so ask sharp; all three are undefined when stripped.
      expect(meta.exif, "no EXIF").toBeUndefined();
      expect(meta.xmp, "no XMP").toBeUndefined();
      expect(meta.iptc, "no IPTC").toBeUndefined();
      expect(meta.orientation ?? 1).toBe(1);
      expect(meta.width! < meta.height!, "portrait after autoOrient").toBe(true);
      for (const secret of ["TestCam", "SN-0042", "Someone Private", "Home address", "Private Person"])
        expect(stored.includes(Buffer.from(secret)), secret).toBe(false);
    }
    expect(r.photos![0].width).toBe(480);
  });

  it("S11e: a ~70-byte PNG declaring 20 000 × 20 000 is refused from its header by the 50 MP cap in < 100 ms", async () => {
    const user = await contributor();
    // The cap is the project's 50 MP (QUALITY.md "Open choices"), far below sharp's own default
    // (sharp docs, api-constructor: limitInputPixels default 268402689 = 0x3FFF²).
    expect(P.PHOTO_LIMITS.maxPixels).toBe(50_000_000);
    const bomb = pngBomb();
    expect(bomb.length).toBeLessThan(100);
    const rss0 = process.memoryUsage().rss;
    const r = await uploadOne(user, bomb, [], "bomb.png");
    const grew = (process.memoryUsage().rss - rss0) / 1024 / 1024;
    console.log(`[S11e] pixel bomb: ${r.status} in ${r.ms.toFixed(1)} ms; RSS growth ${grew.toFixed(1)} MB`);
    expect(r.status).toBe(422);
    expect(r.code).toBe("unprocessable");
    expect(r.message).toMatch(/50 megapixels/);
    expect(r.ms).toBeLessThan(100);
    expect(grew).toBeLessThan(50); // QUALITY S11e: < 50 MB RSS growth
    expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(0);
    await expectNoLeftovers("S11e");
  });

  it("S11f: hostile file names are never paths: stored under a UUID in photos/, the name kept cleaned and cut to 200 characters", async () => {
    const user = await contributor();
    const data = await jpeg();
    const long = "a".repeat(290) + "ß.jpg.php";
    const before = new Set(ls(dir));
    const cases: [string, Part, (n: string) => void][] = [
      ["../../x.jpg", photoPart(data, "../../x.jpg"), (n) => expect(n).toBe("../../x.jpg")],
      ["a.jpg\\0.php (raw NUL)", photoPart(data, "a.jpg\0.php"), (n) => expect(n).toBe("a.jpg.php")],
      [
        "a.jpg%00.php (RFC 5987 filename*)",
        {
          name: "photo",
          type: "image/jpeg",
          data,
          rawHeaders: `Content-Disposition: form-data; name="photo"; filename*=UTF-8''a.jpg%00.php\r\nContent-Type: image/jpeg`,
        },
        (n) => expect(n).toBe("a.jpg.php"),
      ],
      [
        "300 characters",
        photoPart(data, long),
        (n) => {
          expect(Array.from(n)).toHaveLength(200);
          expect(n).toBe(Array.from(long).slice(0, 200).join(""));
        },
      ],
      ["bidi override", photoPart(data, "photo\u202egpj.exe"), (n) => expect(n).toBe("photogpj.exe")],
    ];
    for (const [what, part, check] of cases) {
      const r = await attempt(request(multipart([part, consent])), user);
      expect(r.status, `${what}: ${r.message}`).toBe(201);
      const id = r.photos![0].id;
      expect(id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
      expect(existsSync(photoFile(id)) && existsSync(photoFile(id, true)), what).toBe(true);
      const row = await m.Photo.findByPk(id);
      // eslint-disable-next-line no-control-regex -- control characters are what this checks for
      expect(row!.originalName).not.toMatch(/[\u0000-\u001f\u007f]/);
      check(row!.originalName);
    }
    // Nothing was written outside uploads/ (no x.jpg two levels up, nothing new beside the database).
    expect(ls(dir).filter((f) => !before.has(f) && !f.startsWith("photos.sqlite"))).toEqual([]);
    expect(existsSync(path.join(dir, "x.jpg")) || existsSync(path.join(uploads, "x.jpg")) || existsSync(path.join(P.PHOTOS_DIR, "..", "..", "x.jpg"))).toBe(
      false,
    );
    expect(ls(P.PHOTOS_DIR).every((f) => /^[0-9a-f-]{36}(\.thumb)?\.webp$/.test(f))).toBe(true);
  });

  it("S11g: served photos carry image/webp, nosniff and CSP default-src 'none'; published ones cache for a year, drafts never", async () => {
    const owner = await contributor();
    const r = await uploadOne(owner, await jpeg(320, 240));
    expect(r.status, r.message).toBe(201);
    const id = r.photos![0].id;
    const cookie = await sessionCookie(owner.id);
    const get = (file: string, headers: Record<string, string> = {}) =>
      fileRoute.loader({ request: new Request(`http://127.0.0.1/photos/${file}`, { headers }), params: { file }, context: {} } as never) as Promise<Response>;

    const mine = await get(`${id}.webp`, { Cookie: cookie });
    expect(mine.status).toBe(200);
    expect(mine.headers.get("Content-Type")).toBe("image/webp");
    expect(mine.headers.get("X-Content-Type-Options")).toBe("nosniff");
    expect(mine.headers.get("Content-Security-Policy")).toMatch(/^default-src 'none'(;|$)/);
    expect(mine.headers.get("Cache-Control")).toBe("private, no-store");
    const bytes = Buffer.from(await mine.arrayBuffer());
    expect(bytes.equals(readFileSync(photoFile(id)))).toBe(true);
    expect(Number(mine.headers.get("Content-Length"))).toBe(bytes.length);

    const anonymous = await get(`${id}.webp`);
    expect(anonymous.status).toBe(404);
    expect(anonymous.headers.get("Content-Type")).toMatch(/^text\/plain/);

    const connector = await m.Connector.findOne();
    await m.Photo.update({ connectorId: connector!.id }, { where: { id } });
    for (const file of [`${id}.webp`, `${id}.thumb.webp`]) {
      const pub = await get(file);
      expect(pub.status).toBe(200);
      expect(pub.headers.get("Content-Type")).toBe("image/webp");
      expect(pub.headers.get("X-Content-Type-Options")).toBe("nosniff");
      expect(pub.headers.get("Content-Security-Policy")).toMatch(/^default-src 'none'(;|$)/);
      expect(pub.headers.get("Cache-Control")).toBe("public, max-age=31536000, immutable");
      expect((await sharp(Buffer.from(await pub.arrayBuffer())).metadata()).format).toBe("webp");
    }
    // No route serves the raw upload directory: only <uuid>.webp / <uuid>.thumb.webp names resolve.
    writeFileSync(path.join(P.TMP_DIR, `${id}.part`), "<script>alert(1)</script>");
    try {
      for (const file of [
        `${id}.part`,
        `../tmp/${id}.part`,
        `${id}.webp.part`,
        `${id.toUpperCase()}.webp`,
        `${id}.jpg`,
        "..%2Fphotos.sqlite",
        `${id}.webp/`,
        `${id}.thumb.thumb.webp`,
      ]) {
        expect((await get(file)).status, file).toBe(404);
      }
    } finally {
      rmSync(path.join(P.TMP_DIR, `${id}.part`), { force: true });
    }
    const post = await fileRoute.action();
    expect(post.status).toBe(405);
  });
});

async function sessionCookie(userId: number): Promise<string> {
  const setCookie = await startSession(new Request("http://127.0.0.1/login"), userId);
  return setCookie.split(";")[0];
}

// ---- S2 (photos) ------------------------------------------------------------------------------------------------

describe("S2 photos of a draft are visible only to their owner and moderators (ASVS V4.2.1 IDOR; 404, never 403)", () => {
  it("photoForViewer: owner and moderator yes; another contributor and anonymous null; published: anyone; removed: nobody", async () => {
    const owner = await contributor();
    const other = await contributor();
    const admin = await contributor("admin");
    const r = await uploadOne(owner, await jpeg());
    expect(r.status, r.message).toBe(201);
    const id = r.photos![0].id;
    for (const file of [`${id}.webp`, `${id}.thumb.webp`]) {
      expect(await P.photoForViewer(file, owner)).toEqual({ path: path.join(P.PHOTOS_DIR, file), published: false });
      expect(await P.photoForViewer(file, demo.moderator)).toMatchObject({ published: false });
      expect(await P.photoForViewer(file, admin)).toMatchObject({ published: false });
      expect(await P.photoForViewer(file, other)).toBeNull();
      expect(await P.photoForViewer(file, { id: other.id, role: "rider" })).toBeNull();
      expect(await P.photoForViewer(file, null)).toBeNull();
    }
    // Guessing neighbours or other spellings finds nothing either.
    for (const file of [`${randomUUID()}.webp`, `${id}.jpg`, `${id}`, `../${id}.webp`, `${id}.webp\0`])
      expect(await P.photoForViewer(file, owner), file).toBeNull();

    const connector = await m.Connector.findOne();
    await m.Photo.update({ connectorId: connector!.id }, { where: { id } });
    expect(await P.photoForViewer(`${id}.webp`, null)).toMatchObject({ published: true });
    expect(await P.photoForViewer(`${id}.webp`, other)).toMatchObject({ published: true });

    await m.Photo.update({ removedAt: new Date() }, { where: { id } });
    expect(await P.photoForViewer(`${id}.webp`, owner)).toBeNull();
    expect(await P.photoForViewer(`${id}.webp`, null)).toBeNull();
  });
});

// ---- the API route ----------------------------------------------------------------------------------------------

describe("POST /api/v1/photos (API.md): guards, 201 shape, the one error shape", () => {
  const api = (body: Buffer | null, headers: Record<string, string>, contentType?: string) =>
    apiRoute.action({ request: request(body, { headers, contentType }), params: {}, context: {} } as never) as Promise<Response>;
  const thrown = async (p: Promise<Response>) => {
    try {
      return await p;
    } catch (e) {
      if (e instanceof Response) return e;
      throw e;
    }
  };

  it("401 without a session, 403 for a rider and for a foreign Origin; 201 with {photo, photos}; 415 as {error}", async () => {
    const body = multipart([photoPart(await jpeg()), consent]);
    expect((await thrown(api(body, { Origin: "http://127.0.0.1" }))).status).toBe(401);
    const rider = await contributor("rider");
    expect((await thrown(api(body, { Origin: "http://127.0.0.1", Cookie: await sessionCookie(rider.id) }))).status).toBe(403);
    const user = await contributor();
    const cookie = await sessionCookie(user.id);
    expect((await thrown(api(body, { Origin: "https://evil.example", Cookie: cookie }))).status).toBe(403);
    expect(await m.Photo.count({ where: { ownerId: [rider.id, user.id] } })).toBe(0);

    const ok = await api(body, { Origin: "http://127.0.0.1", Cookie: cookie });
    expect(ok.status).toBe(201);
    const json = (await ok.json()) as { photo: Record<string, unknown>; photos: Record<string, unknown>[] };
    expect(Object.keys(json.photo).sort()).toEqual(["height", "id", "thumbUrl", "url", "width"]);
    expect(json.photo.url).toBe(`/photos/${json.photo.id}.webp`);
    expect(json.photo.thumbUrl).toBe(`/photos/${json.photo.id}.thumb.webp`);
    expect(json.photos).toEqual([json.photo]);

    const bad = await api(Buffer.from("hello"), { Origin: "http://127.0.0.1", Cookie: cookie }, "text/plain");
    expect(bad.status).toBe(415);
    expect(await bad.json()).toMatchObject({ error: { code: "unsupported_media_type", message: expect.any(String) } });
    const get = apiRoute.loader();
    expect(get.status).toBe(405);
    expect(get.headers.get("Allow")).toBe("POST");
  });
});

// ---- submissions ------------------------------------------------------------------------------------------------

describe("photos on a submission: own draft or returned only; content.photos and version in the same transaction", () => {
  it("appends {id, caption, credit} to content.photos, bumps version by 1, sets submissionId and position", async () => {
    const user = await contributor();
    const s = await draft(user);
    const r = await attempt(
      request(
        multipart([
          photoPart(await jpeg()),
          photoPart(await jpeg(), "second.jpg"),
          consent,
          { name: "caption", data: "Wire side,\tlatch\r\nup" },
          { name: "credit", data: " A. Rider " },
          { name: "intent", data: "upload" },
          { name: "version", data: "1" },
        ]),
      ),
      user,
      { submissionId: s.id },
    );
    expect(r.status, r.message).toBe(201);
    expect(r.fields).toEqual({ intent: "upload", version: "1" });
    await s.reload();
    expect(s.version).toBe(2);
    const content = s.content as { name: string; photos: { id: string; caption: string; credit: string }[] };
    expect(content.name).toBe("Test plug");
    expect(content.photos).toEqual(r.photos!.map((p) => ({ id: p.id, caption: "Wire side, latch up", credit: "A. Rider" })));
    const rows = await m.Photo.findAll({ where: { submissionId: s.id }, order: [["position", "ASC"]] });
    expect(rows.map((p) => [p.id, p.position, p.licence])).toEqual(r.photos!.map((p, i) => [p.id, i, "CC BY-SA 4.0"]));
    // The `submission` field does the same for the API route.
    const viaField = await attempt(request(multipart([photoPart(await jpeg()), consent, { name: "submission", data: String(s.id) }])), user);
    expect(viaField.status, viaField.message).toBe(201);
    await s.reload();
    expect(s.version).toBe(3);
    expect((s.content as { photos: unknown[] }).photos).toHaveLength(3);
    const third = await m.Photo.findByPk(viaField.photos![0].id);
    expect([third!.submissionId, third!.position]).toEqual([s.id, 2]);
  });

  it("someone else's submission → 404, one in review or published → 409, a bad id → 400; nothing stored", async () => {
    const owner = await contributor();
    const other = await contributor();
    const mine = await draft(owner);
    const returned = await draft(owner, "returned");
    const body = async (sub?: string) => multipart([photoPart(await jpeg()), consent, ...(sub ? [{ name: "submission", data: sub }] : [])]);
    expect((await attempt(request(await body()), other, { submissionId: mine.id })).status).toBe(404);
    expect((await attempt(request(await body(String(mine.id))), other)).status).toBe(404);
    expect((await attempt(request(await body(String(999_999))), other)).status).toBe(404);
    for (const state of ["in_review", "published", "declined"]) {
      const s = await draft(owner, state);
      const r = await attempt(request(await body(String(s.id))), owner);
      expect(r.status, state).toBe(409);
      expect((await m.Submission.findByPk(s.id))!.version).toBe(1);
    }
    for (const bad of ["abc", "-1", "0", "1e3", "12345678901234"]) expect((await attempt(request(await body(bad)), owner)).status, bad).toBe(400);
    expect(await m.Photo.count({ where: { ownerId: [owner.id, other.id] } })).toBe(0);
    expect((await attempt(request(await body(String(returned.id))), owner)).status).toBe(201);
    await expectNoLeftovers("submission checks");
  });

  it("S12: the 13th photo on a submission → 429 saying the limit of 12", async () => {
    const user = await contributor();
    const s = await draft(user);
    const parts = await Promise.all(Array.from({ length: 12 }, async (_, i) => photoPart(await jpeg(), `p${i}.jpg`)));
    expect((await attempt(request(multipart([...parts, consent])), user, { submissionId: s.id })).status).toBe(201);
    const r = await attempt(request(multipart([photoPart(await jpeg()), consent])), user, { submissionId: s.id });
    expect(r.status).toBe(429);
    expect(r.message).toMatch(/at most 12 photos/);
    expect(await m.Photo.count({ where: { submissionId: s.id } })).toBe(12);
    await expectNoLeftovers("submission limit");
  });
});

// ---- S12 --------------------------------------------------------------------------------------------------------

describe("S12 quotas and anti-automation (ASVS 4.0.3 V12.1.3, V11.1.4; ASVS 5.0 V15.4.2 check-and-act atomically)", () => {
  it("the N+1-th photo over the per-user count → 429 with the limit in the message", async () => {
    const user = await contributor();
    const undo = await fakeRows(user, P.PHOTO_LIMITS.perUserCount);
    try {
      const r = await uploadOne(user, await jpeg());
      expect(r.status).toBe(429);
      expect(r.message).toContain(`at most ${P.PHOTO_LIMITS.perUserCount} photos`);
      expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(P.PHOTO_LIMITS.perUserCount);
      await expectNoLeftovers("count quota");
    } finally {
      await undo();
    }
  });

  it("the upload that crosses the byte quota → 413 with the limit in the message", async () => {
    const user = await contributor();
    const undo = await fakeRows(user, 1, P.PHOTO_LIMITS.perUserBytes - 100);
    try {
      const r = await uploadOne(user, await jpeg());
      expect(r.status).toBe(413);
      expect(r.message).toMatch(/at most 200 MB/);
      await expectNoLeftovers("byte quota");
    } finally {
      await undo();
    }
  });

  it(`more than ${20} uploads a minute → 429 with Retry-After`, async () => {
    expect(P.PHOTO_LIMITS.perMinute).toBe(20); // the default (PHOTO_PER_MINUTE unset)
    const user = await contributor();
    const data = await jpeg(16, 16);
    for (let i = 0; i < P.PHOTO_LIMITS.perMinute; i++) expect((await uploadOne(user, data)).status, `upload ${i + 1}`).toBe(201);
    const r = await uploadOne(user, data);
    expect(r.status).toBe(429);
    expect(Number(r.headers?.["Retry-After"])).toBeGreaterThan(0);
    expect(r.message).toMatch(/20 uploads a minute/);
    // Another user is not affected.
    expect((await uploadOne(await contributor(), data)).status).toBe(201);
    await m.Photo.destroy({ where: { ownerId: user.id } });
    await P.sweepPhotos({ orphanAgeMs: 0, tmpAgeMs: 0 });
  });

  it("10 parallel uploads at quota − 3 → exactly 3 succeed, the others get 429 and leave no files", async () => {
    const user = await contributor();
    const undo = await fakeRows(user, P.PHOTO_LIMITS.perUserCount - 3);
    try {
      const data = await jpeg(64, 48);
      const results = await Promise.all(Array.from({ length: 10 }, () => uploadOne(user, data)));
      const statuses = results.map((r) => r.status).sort();
      expect(statuses).toEqual([201, 201, 201, 429, 429, 429, 429, 429, 429, 429]);
      expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(P.PHOTO_LIMITS.perUserCount);
      await expectNoLeftovers("parallel quota");
    } finally {
      await undo();
    }
  });
});

// ---- F5 ---------------------------------------------------------------------------------------------------------

describe("F5 malformed multipart (QUALITY F5; SQLite testing: malformed input must yield errors, never crashes)", () => {
  it("every case of the corpus → 400/413/415/422 in < 1 s, never an unexpected exception, no files left", async () => {
    const data = await jpeg();
    const valid = multipart([photoPart(data), consent]);
    // Boundaries are 1–70 characters (RFC 2046, 5.1.1); part headers are capped at 8 KiB (form-data-parser's
    // maxHeaderSize, set explicitly); everything else is the project's own limit.
    const cases: [string, () => Request, number[]][] = [
      ["no boundary", () => request(valid, { contentType: "multipart/form-data" }), [415]],
      ["empty boundary", () => request(valid, { contentType: "multipart/form-data; boundary=" }), [415]],
      [
        "boundary longer than 70 characters",
        () => request(multipart([photoPart(data), consent], "b".repeat(80)), { contentType: `multipart/form-data; boundary=${"b".repeat(80)}` }),
        [400],
      ],
      ["wrong boundary", () => request(valid, { contentType: "multipart/form-data; boundary=somethingElse" }), [400]],
      ["truncated closing boundary", () => request(valid.subarray(0, valid.length - 6)), [400]],
      ["no closing boundary", () => request(multipart([photoPart(data), consent], BOUNDARY, false)), [400]],
      [
        "part headers > 8 KB",
        () =>
          request(
            multipart([
              { name: "photo", data, rawHeaders: `Content-Disposition: form-data; name="photo"; filename="a.jpg"\r\nX-Padding: ${"p".repeat(9000)}` },
              consent,
            ]),
          ),
        [400],
      ],
      ["1 000 empty parts", () => request(multipart(Array.from({ length: 1000 }, (_, i) => ({ name: `f${i}`, data: "" })))), [400]],
      [
        "1 000 empty parts beside a photo",
        () => request(multipart([photoPart(data), consent, ...Array.from({ length: 1000 }, (_, i) => ({ name: `f${i}`, data: "" }))])),
        [400],
      ],
      ["1 000 unnamed parts", () => request(multipart(Array.from({ length: 1000 }, () => ({ data: "" })))), [400]],
      ["unnamed file part", () => request(multipart([{ filename: "a.jpg", type: "image/jpeg", data }, consent])), [400]],
      ["file under another field name", () => request(multipart([{ name: "avatar", filename: "a.jpg", type: "image/jpeg", data }, consent])), [400]],
      ["photo sent as a text field", () => request(multipart([{ name: "photo", data: "not a file" }, consent])), [400]],
      ["filename with CR/LF", () => request(multipart([photoPart(data, "a\r\nContent-Type: text/html\r\n.jpg"), consent])), [201, 400]],
      ["filename with NUL", () => request(multipart([photoPart(data, "evil\0.jpg"), consent])), [201, 400]],
      [
        "nested multipart (multipart/mixed file part)",
        () =>
          request(
            multipart([{ name: "photo", filename: "inner", type: "multipart/mixed; boundary=inner", data: multipart([photoPart(data)], "inner") }, consent]),
          ),
        [415],
      ],
      [
        "nested multipart as a text part",
        () => request(multipart([{ name: "photo", type: "multipart/mixed; boundary=inner", data: multipart([photoPart(data)], "inner") }, consent])),
        [400],
      ],
      ["Content-Type: text/plain", () => request(valid, { contentType: "text/plain" }), [415]],
      [
        "Content-Type: application/x-www-form-urlencoded",
        () => request(Buffer.from("photo=x&consent=yes"), { contentType: "application/x-www-form-urlencoded" }),
        [415],
      ],
      ["Content-Type: multipart/mixed", () => request(valid, { contentType: `multipart/mixed; boundary=${BOUNDARY}` }), [415]],
      ["no Content-Type", () => request(valid, { contentType: null }), [415]],
      ["no body", () => request(null), [400]],
      ["empty body", () => request(Buffer.alloc(0)), [400]],
      ["garbage body", () => request(Buffer.from("\x00\x01\x02 definitely not multipart")), [400]],
      ["preamble before the first boundary", () => request(Buffer.concat([Buffer.from("preamble\r\n"), valid])), [400]],
      [
        "invalid UTF-8 in a text field",
        () => request(multipart([photoPart(data), consent, { name: "caption", data: Buffer.from([0xc3, 0x28, 0xff]) }])),
        [400],
      ],
      [
        "invalid UTF-8 in a part header",
        () =>
          request(
            multipart([
              {
                name: "photo",
                data,
                rawHeaders: Buffer.from(`Content-Disposition: form-data; name="photo"; filename="\xff\xfe.jpg"\r\nContent-Type: image/jpeg`, "latin1"),
              },
              consent,
            ]),
          ),
        [400],
      ],
      ["body longer than its Content-Length", () => request(valid, { contentLength: 1000 }), [400]],
      ["no consent", () => request(multipart([photoPart(data)])), [400]],
      ["consent=no", () => request(multipart([photoPart(data), { name: "consent", data: "no" }])), [400]],
      ["caption of 201 characters", () => request(multipart([photoPart(data), consent, { name: "caption", data: "c".repeat(201) }])), [400]],
      ["70 KB of text fields", () => request(multipart([photoPart(data), consent, { name: "notes", data: "n".repeat(70 * 1024) }])), [413]],
      ["16 MB text field", () => request(multipart([photoPart(data), consent, { name: "notes", data: "n".repeat(16 * 1024 * 1024) }])), [413]],
    ];
    let user = await contributor();
    let used = 0;
    const rss0 = process.memoryUsage().rss;
    const seen: string[] = [];
    for (const [what, make, expected] of cases) {
      if (++used > 15) {
        user = await contributor();
        used = 1;
      } // stay under the per-minute limit
      const r = await attempt(make(), user);
      seen.push(`${what}: ${r.status} ${r.code ?? ""} (${r.ms.toFixed(0)} ms)`);
      expect(expected, `${what}: got ${r.status} ${r.message}`).toContain(r.status);
      expect(r.ms, what).toBeLessThan(1000);
      // eslint-disable-next-line no-control-regex -- control characters are what this checks for
      if (r.status === 201) expect(r.photos![0].originalName).not.toMatch(/[\u0000-\u001f]/);
      expect(tmpFiles(), `${what}: tmp/ empty`).toEqual([]);
    }
    console.log(`[F5] ${seen.join("; ")}`);

    // 200+ random byte mutations of a valid body (seeded, reproducible).
    const rnd = mulberry32(20261201);
    const body = multipart([photoPart(data), consent, { name: "caption", data: "Connector, wire side" }]);
    const counts: Record<number, number> = {};
    const stored: string[] = [];
    let slowest = 0;
    for (let i = 0; i < 240; i++) {
      if (++used > 15) {
        user = await contributor();
        used = 1;
      }
      const mutated = Buffer.from(body);
      const edits = 1 + Math.floor(rnd() * 8);
      for (let k = 0; k < edits; k++) {
        const at = Math.floor(rnd() * mutated.length);
        const op = pick(rnd, ["flip", "set", "crlf", "dash"] as const);
        if (op === "flip") mutated[at] ^= 1 << Math.floor(rnd() * 8);
        else if (op === "set") mutated[at] = Math.floor(rnd() * 256);
        else if (op === "crlf") mutated[at] = pick(rnd, [0x0d, 0x0a]);
        else mutated[at] = 0x2d;
      }
      const cut = rnd() < 0.15 ? mutated.subarray(0, Math.floor(rnd() * mutated.length)) : mutated;
      const r = await attempt(request(cut), user);
      counts[r.status] = (counts[r.status] ?? 0) + 1;
      for (const p of r.photos ?? []) stored.push(p.id);
      slowest = Math.max(slowest, r.ms);
      // A mutation inside the caption or the image's entropy-coded data can leave a valid upload: then it is stored
      // (as a fresh WebP) like any other; everything else must be refused with a 4xx.
      expect([201, 400, 413, 415, 422], `mutation ${i}: ${r.status} ${r.message}`).toContain(r.status);
      expect(r.ms, `mutation ${i}`).toBeLessThan(1000);
    }
    const grew = (process.memoryUsage().rss - rss0) / 1024 / 1024;
    console.log(
      `[F5] 240 mutations: ${JSON.stringify(counts)}; slowest ${slowest.toFixed(0)} ms; RSS ${grew >= 0 ? "+" : ""}${grew.toFixed(1)} MB over the corpus`,
    );
    await expectNoLeftovers("F5");
    // Whatever a mutation left valid was stored as a fresh, decodable WebP.
    for (const id of stored) expect((await sharp(readFileSync(photoFile(id))).metadata()).format).toBe("webp");
  });
});

// ---- F6 ---------------------------------------------------------------------------------------------------------

/** A body produced on demand in 64 KiB chunks; `pulled` counts what the receiver actually read. */
function lazyBody(head: Buffer, fillBytes: number, tail: Buffer) {
  const meter = { pulled: 0 };
  let sent = 0;
  const total = head.length + fillBytes + tail.length;
  const chunk = Buffer.alloc(64 * 1024, 0x41);
  const stream = new ReadableStream<Uint8Array>(
    {
      pull(controller) {
        let out: Buffer;
        if (sent === 0) out = head;
        else if (sent < head.length + fillBytes) out = chunk.subarray(0, Math.min(chunk.length, head.length + fillBytes - sent));
        else if (sent < total) out = tail;
        else return controller.close();
        sent += out.length;
        meter.pulled += out.length;
        controller.enqueue(new Uint8Array(out));
      },
    },
    { highWaterMark: 0 },
  );
  return { stream, meter, total };
}

describe("F6 oversized bodies: limits enforced while streaming (QUALITY F6; form-data-parser maxFileSize, STACK.md gotcha 11)", () => {
  it("a 30 MB photo against the 15 MB limit → 413, having read at most limit + 1 MB", async () => {
    const user = await contributor();
    const head = Buffer.concat([
      Buffer.from(
        `--${BOUNDARY}\r\nContent-Disposition: form-data; name="consent"\r\n\r\nyes\r\n--${BOUNDARY}\r\nContent-Disposition: form-data; name="photo"; filename="big.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`,
      ),
      await jpeg(),
    ]);
    const { stream, meter } = lazyBody(head, 30 * 1024 * 1024, Buffer.from(`\r\n--${BOUNDARY}--\r\n`));
    const r = await attempt(request(stream, { contentLength: null }), user);
    const past = meter.pulled - P.PHOTO_LIMITS.maxBytes;
    console.log(`[F6] 30 MB photo: ${r.status}; read ${(meter.pulled / 1048576).toFixed(2)} MB, ${(past / 1024).toFixed(0)} KiB past the 15 MiB limit`);
    expect(r.status).toBe(413);
    expect(r.message).toMatch(/at most 15 MB/);
    expect(meter.pulled).toBeLessThanOrEqual(P.PHOTO_LIMITS.maxBytes + 1024 * 1024);
    await expectNoLeftovers("F6 30 MB");
  });

  it(`21 files → 413 (at most ${12} per request), the ones already written removed`, async () => {
    const user = await contributor();
    const parts = await Promise.all(Array.from({ length: 21 }, async (_, i) => photoPart(await jpeg(), `p${i}.jpg`)));
    const r = await attempt(request(multipart([consent, ...parts])), user);
    expect(r.status).toBe(413);
    expect(r.message).toMatch(/at most 12 photos/);
    expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(0);
    await expectNoLeftovers("F6 21 files");
  });

  it("a Content-Length over the cap → 413 before a single byte is read", async () => {
    const user = await contributor();
    const { stream, meter } = lazyBody(Buffer.from(`--${BOUNDARY}\r\n`), 1024 * 1024, Buffer.from(`--${BOUNDARY}--\r\n`));
    const r = await attempt(request(stream, { contentLength: P.MAX_BODY_BYTES + 1 }), user);
    expect(r.status).toBe(413);
    expect(meter.pulled).toBe(0);
  });

  it("a chunked body past the whole-request cap is cut off at the cap (counting stream)", async () => {
    const user = await contributor();
    // Many files just under the per-file limit would pass the parser one by one: the counting stream stops the total.
    // Text parts are cheaper to generate: 16 MB of text in one field is cut by the non-file allowance.
    const head = Buffer.from(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="notes"\r\n\r\n`);
    const { stream, meter } = lazyBody(head, 200 * 1024 * 1024, Buffer.from(`\r\n--${BOUNDARY}--\r\n`));
    const r = await attempt(request(stream, { contentLength: null }), user);
    expect(r.status).toBe(413);
    expect(meter.pulled).toBeLessThanOrEqual(P.PHOTO_LIMITS.maxBytes + 1024 * 1024);
    console.log(`[F6] 200 MB of text: ${r.status} after ${(meter.pulled / 1048576).toFixed(2)} MB`);
  });
});

// ---- F8 ---------------------------------------------------------------------------------------------------------

describe("F8 hostile or broken images → 422 in < 500 ms, no row (sharp failOn 'warning', 50 MP cap, pages: 1 set explicitly)", () => {
  it("truncated JPEG, 0-byte file, valid header + garbage, PNG and JPEG pixel bombs, animated WebP with 10 000 frames", async () => {
    const good = await jpeg(320, 240);
    const frames = 10_000;
    const w = 8;
    const raw = Buffer.alloc(w * w * 3 * frames);
    for (let f = 0; f < frames; f++) raw.fill(f % 251, f * w * w * 3, (f + 1) * w * w * 3);
    const animated = await sharp(raw, { raw: { width: w, height: w * frames, channels: 3, pageHeight: w } })
      .webp({ effort: 0, lossless: true })
      .toBuffer();
    expect((await sharp(animated).metadata()).pages).toBe(frames);
    const pngHeaderGarbage = Buffer.concat([pngBomb(64, 48).subarray(0, 33), Buffer.alloc(4000, 0x5a)]);
    const cases: [string, Buffer, string][] = [
      ["truncated JPEG", good.subarray(0, Math.floor(good.length / 2)), "t.jpg"],
      ["0-byte file", Buffer.alloc(0), "empty.jpg"],
      ["JPEG header + garbage", Buffer.concat([good.subarray(0, 200), Buffer.alloc(5000, 0x55)]), "g.jpg"],
      ["PNG header + garbage", pngHeaderGarbage, "g.png"],
      [
        "WebP header + garbage",
        Buffer.concat([Buffer.from("RIFF"), Buffer.from([0x00, 0x10, 0, 0]), Buffer.from("WEBPVP8 "), Buffer.alloc(4096, 0x33)]),
        "g.webp",
      ],
      ["PNG pixel bomb (20 000 × 20 000)", pngBomb(), "bomb.png"],
      ["JPEG pixel bomb (SOF0 says 60 000 × 60 000)", jpegBomb(good), "bomb.jpg"],
      [`animated WebP, ${frames} frames`, animated, "anim.webp"],
    ];
    let user = await contributor();
    const timings: string[] = [];
    for (const [i, [what, data, name]] of cases.entries()) {
      if (i === 7) user = await contributor();
      const r = await uploadOne(user, data, [], name);
      timings.push(`${what}: ${r.status} in ${r.ms.toFixed(1)} ms`);
      expect(r.status, `${what}: ${r.message}`).toBe(422);
      expect(r.code).toBe("unprocessable");
      expect(r.ms, what).toBeLessThan(500);
    }
    console.log(`[F8] ${timings.join("; ")}`);
    expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(0);
    await expectNoLeftovers("F8");
  });
});

// ---- F4 ---------------------------------------------------------------------------------------------------------

describe("F4 disk full: ENOSPC at each write → 507 with an error id, no row, no files; the next upload succeeds", () => {
  it("uploadFault enospc:1 (tmp), :2 (display .part), :3 (thumbnail .part)", async () => {
    const user = await contributor();
    const data = await jpeg(320, 240);
    const logged = vi.spyOn(console, "error").mockImplementation(() => {});
    try {
      for (const n of [1, 2, 3]) {
        faults.setFaults({ uploadFault: `enospc:${n}` });
        const r = await uploadOne(user, data);
        expect(r.status, `write ${n}: ${r.message}`).toBe(507);
        expect(r.code).toBe("insufficient_storage");
        const id = /error id ([0-9a-f]{8})/.exec(r.message ?? "")?.[1];
        expect(id, "the message carries an error id").toBeTruthy();
        expect(
          logged.mock.calls.some((c) => String(c[0]).includes(id!)),
          "the log line carries the same id",
        ).toBe(true);
        expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(0);
        await expectNoLeftovers(`ENOSPC at write ${n}`);
      }
    } finally {
      faults.setFaults({});
      logged.mockRestore();
    }
    const r = await uploadOne(user, data);
    expect(r.status, r.message).toBe(201);
    expect(await m.Photo.count({ where: { ownerId: user.id } })).toBe(1);
  });
});

// ---- D7 ---------------------------------------------------------------------------------------------------------

describe("D7 orphan sweeper (QUALITY D7: old orphans go, referenced and young files stay; idempotent; safe beside uploads)", () => {
  it("removes only old tmp files, old .part files and old unreferenced photos; a second run removes nothing", async () => {
    const user = await contributor();
    const r = await uploadOne(user, await jpeg());
    expect(r.status).toBe(201);
    const kept = r.photos![0].id;
    const now = Date.now();
    const put = (file: string, ageMs: number, data = "x") => {
      writeFileSync(file, data);
      const t = new Date(now - ageMs);
      utimesSync(file, t, t);
      return file;
    };
    const H = 3600_000;
    // The referenced photo is a month old: still kept.
    for (const f of [photoFile(kept), photoFile(kept, true)]) utimesSync(f, new Date(now - 720 * H), new Date(now - 720 * H));
    const oldOrphan = randomUUID();
    const youngOrphan = randomUUID();
    const gone = [
      put(path.join(P.TMP_DIR, `${randomUUID()}.part`), 2 * H),
      put(path.join(P.TMP_DIR, "leftover-from-elsewhere"), 2 * H),
      put(path.join(P.PHOTOS_DIR, `${randomUUID()}.webp.part`), 2 * H),
      put(path.join(P.PHOTOS_DIR, `${randomUUID()}.thumb.webp.part`), 2 * H),
      put(photoFile(oldOrphan), 25 * H),
      put(photoFile(oldOrphan, true), 25 * H),
    ];
    const stay = [
      put(path.join(P.TMP_DIR, `${randomUUID()}.part`), 10_000), // an upload in flight in another process
      put(path.join(P.PHOTOS_DIR, `${randomUUID()}.webp.part`), 10_000),
      put(photoFile(youngOrphan), 1 * H), // renamed, its row not inserted yet
      put(path.join(P.PHOTOS_DIR, "README.txt"), 1000 * H), // not ours: never touched
      photoFile(kept),
      photoFile(kept, true),
    ];
    const first = await P.sweepPhotos({ now: new Date(now) });
    expect(first).toMatchObject({ tmpRemoved: 2, partsRemoved: 2, orphansRemoved: 2 });
    for (const f of gone) expect(existsSync(f), `removed ${path.basename(f)}`).toBe(false);
    for (const f of stay) expect(existsSync(f), `kept ${path.basename(f)}`).toBe(true);
    const second = await P.sweepPhotos({ now: new Date(now) });
    expect(second).toMatchObject({ tmpRemoved: 0, partsRemoved: 0, orphansRemoved: 0 });
    for (const f of stay) expect(existsSync(f)).toBe(true);
    // With no grace at all, the young leftovers go too, and still nothing referenced.
    const zero = await P.sweepPhotos({ tmpAgeMs: 0, orphanAgeMs: 0 });
    expect(zero).toMatchObject({ tmpRemoved: 1, partsRemoved: 1, orphansRemoved: 1 });
    expect(existsSync(photoFile(kept)) && existsSync(photoFile(kept, true))).toBe(true);
    rmSync(path.join(P.PHOTOS_DIR, "README.txt"));
    await expectNoLeftovers("D7");
  });

  it("200 randomized runs interleaving sweeps (no grace period) with uploads never delete a referenced file", async () => {
    const rnd = mulberry32(7);
    const good = await jpeg(24, 16);
    const broken = good.subarray(0, good.length - 40);
    let user = await contributor();
    let used = 0;
    const t0 = performance.now();
    const outcomes: Record<string, number> = {};
    let sweepMs = 0;
    let sweepCount = 0;
    for (let run = 0; run < 200; run++) {
      if (++used > 15) {
        user = await contributor();
        used = 1;
      }
      const kind = pick(rnd, ["good", "good", "good", "broken", "html", "two"] as const);
      const parts =
        kind === "two" ? [photoPart(good), photoPart(good, "b.jpg")] : [photoPart(kind === "broken" ? broken : kind === "html" ? Buffer.from("<html>") : good)];
      const upload = attempt(request(multipart([...parts, consent])), user);
      const sweeps = Array.from(
        { length: 1 + Math.floor(rnd() * 3) },
        () =>
          new Promise<void>((resolve, reject) => {
            setTimeout(
              () => {
                const s0 = performance.now();
                P.sweepPhotos({ tmpAgeMs: 0, orphanAgeMs: 0 }).then(() => {
                  sweepMs += performance.now() - s0;
                  sweepCount++;
                  resolve();
                }, reject);
              },
              Math.floor(rnd() * 25),
            );
          }),
      );
      const [r] = await Promise.all([upload, ...sweeps]);
      outcomes[r.status] = (outcomes[r.status] ?? 0) + 1;
      for (const p of r.photos ?? []) {
        expect(existsSync(photoFile(p.id)) && existsSync(photoFile(p.id, true)), `run ${run}: ${p.id} has both files`).toBe(true);
      }
    }
    // Every row with files on disk still has both, and each decodes; nothing unreferenced is left after a final sweep.
    await P.sweepPhotos({ tmpAgeMs: 0, orphanAgeMs: 0 });
    const rows = await m.Photo.findAll({ where: { removedAt: null } });
    let checked = 0;
    for (const p of rows) {
      const [a, b] = [photoFile(p.id), photoFile(p.id, true)];
      if (!existsSync(a) && !existsSync(b) && p.width === 10) continue; // fake quota rows have no files
      expect(existsSync(a) && existsSync(b), `row ${p.id} has both files`).toBe(true);
      expect(statSync(a).size + statSync(b).size).toBe(p.bytes);
      checked++;
    }
    console.log(
      `[D7] 200 runs in ${((performance.now() - t0) / 1000).toFixed(1)} s: ${JSON.stringify(outcomes)}; ${sweepCount} sweeps, ${(sweepMs / sweepCount).toFixed(1)} ms each on average (overlapping the uploads); ${checked} rows checked`,
    );
    expect(outcomes[201]).toBeGreaterThan(50);
    await expectNoLeftovers("D7 randomized");
  });

  it("startPhotoSweeper is off with PHOTO_SWEEPER=off and the directories exist", () => {
    P.startPhotoSweeper(); // PHOTO_SWEEPER=off in this suite: no timer, no effect
    expect(existsSync(P.TMP_DIR) && existsSync(P.PHOTOS_DIR)).toBe(true);
    mkdirSync(P.TMP_DIR, { recursive: true });
  });
});
