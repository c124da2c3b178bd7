/**
 * Processing one received photo with sharp: the pixel cap, only the JPEG/PNG/WebP decoders, orientation applied, every
 * piece of metadata dropped; WebP display size and thumbnail written durably and renamed into photos/.
 */
import { rename, rm } from "node:fs/promises";
import path from "node:path";
import sharp, { type Metadata, type OutputInfo } from "sharp";
import { type AcceptedKind } from "~/domain/image-sniff";
import { PhotoError } from "./errors.server";
import { crashAt } from "./faults.server";
import { PHOTO_LIMITS } from "./limits.server";
import { PHOTOS_DIR, syncDir, writeDurable } from "./storage.server";
import { env } from "~/env.server";

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

// At most this many sharp pipelines at once: sharp, sqlite3 and bcrypt share libuv's pool (QUALITY P5).
const PIPELINES = env.PHOTO_PIPELINES;
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

export interface Received {
  id: string;
  tmp: string;
  kind: AcceptedKind;
  originalName: string;
}
export interface Processed extends Received {
  width: number;
  height: number;
  thumbWidth: number;
  thumbHeight: number;
  bytes: number;
}

/** Decode with the limits, re-encode as WebP (display + thumbnail), write both durably, rename them into place. */
export async function processOne(u: Received, written: Set<string>): Promise<Processed> {
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
      display = await sharp(u.tmp, DECODE)
        .autoOrient()
        .resize({ width: PHOTO_LIMITS.displayEdge, height: PHOTO_LIMITS.displayEdge, ...edge })
        .webp({ quality: 82 })
        .toBuffer({ resolveWithObject: true });
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
    const thumb = await sharp(display.data, DECODE)
      .resize({ width: PHOTO_LIMITS.thumbEdge, height: PHOTO_LIMITS.thumbEdge, ...edge })
      .webp({ quality: 75 })
      .toBuffer({ resolveWithObject: true })
      .catch((e: unknown) => {
        throw unreadable(e);
      });
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
    return {
      ...u,
      width: display.info.width,
      height: display.info.height,
      thumbWidth: thumb.info.width,
      thumbHeight: thumb.info.height,
      bytes: display.data.length + thumb.data.length,
    };
  });
}

const pixelFlood = () =>
  new PhotoError(
    422,
    "unprocessable",
    `The image is too large to process: at most ${PHOTO_LIMITS.maxPixels / 1_000_000} megapixels. Resize it and try again.`,
    "photo",
  );

function unreadable(e: unknown): PhotoError {
  if (e instanceof PhotoError) return e;
  if (/exceeds pixel limit/i.test(String((e as Error)?.message))) return pixelFlood();
  return new PhotoError(422, "unprocessable", "The image could not be read: it looks truncated or damaged. Export it again as JPEG and retry.", "photo");
}
