/**
 * What an uploaded file really is, from its first bytes (never from its name or the Content-Type the browser sent:
 * OWASP File Upload Cheat Sheet, "don't trust the Content-Type header"). Only JPEG, PNG and WebP are accepted; every
 * other format is named so the contributor can be told what to do (a phone's HEIC photo: export it as JPEG).
 */

export type AcceptedKind = "jpeg" | "png" | "webp";
export type RejectedFormat = "heic" | "avif" | "gif" | "tiff" | "svg" | "html" | "xml" | "pdf" | "bmp" | "ico" | "psd" | "jxl" | "jp2" | "text" | "unknown";

export type Sniffed = { ok: true; kind: AcceptedKind; animated: boolean } | { ok: false; format: RejectedFormat | "empty" };

/** How many leading bytes `sniffImage` looks at (enough for the WebP VP8X flags and a text prologue). */
export const SNIFF_BYTES = 512;

const ascii = (b: Uint8Array, from: number, to: number) => String.fromCharCode(...b.subarray(from, Math.min(to, b.length)));
const startsWith = (b: Uint8Array, sig: readonly number[], at = 0) => b.length >= at + sig.length && sig.every((v, i) => b[at + i] === v);

// ISO/IEC 23008-12 (HEIF) brands; "avif"/"avis" are AV1 in HEIF (AV1 Image File Format).
const HEIC_BRANDS = new Set(["heic", "heix", "hevc", "hevx", "heim", "heis", "hevm", "hevs", "mif1", "msf1", "mif2"]);
const AVIF_BRANDS = new Set(["avif", "avis"]);

/** Name the format of a file from its first bytes (pass at least SNIFF_BYTES when the file is that long). */
export function sniffImage(head: Uint8Array): Sniffed {
  if (head.length === 0) return { ok: false, format: "empty" };
  // JPEG: SOI marker FF D8 followed by the next marker's FF (ITU-T T.81, B.1.1.3).
  if (startsWith(head, [0xff, 0xd8, 0xff])) return { ok: true, kind: "jpeg", animated: false };
  // PNG: the 8-byte signature 89 50 4E 47 0D 0A 1A 0A (PNG specification, 5.2).
  if (startsWith(head, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return { ok: true, kind: "png", animated: false };
  // WebP: a RIFF container whose form type is "WEBP" (WebP Container Specification). In an extended file (VP8X first),
  // bit 1 of the flags byte at offset 20 says the file is animated.
  if (ascii(head, 0, 4) === "RIFF" && ascii(head, 8, 12) === "WEBP") {
    const animated = ascii(head, 12, 16) === "VP8X" && head.length > 20 && (head[20]! & 0x02) !== 0;
    return { ok: true, kind: "webp", animated };
  }
  // ISO base media file (ISO/IEC 14496-12): a box size, then "ftyp" and the major brand; compatible brands follow.
  if (ascii(head, 4, 8) === "ftyp") {
    const boxEnd = Math.min(head.length, ((head[0]! << 24) | (head[1]! << 16) | (head[2]! << 8) | head[3]!) >>> 0 || head.length);
    const brands = [ascii(head, 8, 12)];
    for (let at = 16; at + 4 <= boxEnd; at += 4) brands.push(ascii(head, at, at + 4));
    if (brands.some((b) => AVIF_BRANDS.has(b))) return { ok: false, format: "avif" };
    if (brands.some((b) => HEIC_BRANDS.has(b))) return { ok: false, format: "heic" };
    return { ok: false, format: "unknown" };
  }
  // GIF87a / GIF89a (GIF89a specification, 17. Header).
  if (ascii(head, 0, 3) === "GIF") return { ok: false, format: "gif" };
  // TIFF: "II*\0" little-endian or "MM\0*" big-endian (TIFF 6.0, section 2), and BigTIFF's 43 in place of 42.
  if (
    startsWith(head, [0x49, 0x49, 0x2a, 0x00]) ||
    startsWith(head, [0x4d, 0x4d, 0x00, 0x2a]) ||
    startsWith(head, [0x49, 0x49, 0x2b, 0x00]) ||
    startsWith(head, [0x4d, 0x4d, 0x00, 0x2b])
  )
    return { ok: false, format: "tiff" };
  if (ascii(head, 0, 5) === "%PDF-") return { ok: false, format: "pdf" };
  if (ascii(head, 0, 2) === "BM") return { ok: false, format: "bmp" };
  if (startsWith(head, [0x00, 0x00, 0x01, 0x00])) return { ok: false, format: "ico" };
  if (ascii(head, 0, 4) === "8BPS") return { ok: false, format: "psd" };
  // JPEG XL: a bare codestream FF 0A, or the container box "JXL " (ISO/IEC 18181-2).
  if (startsWith(head, [0xff, 0x0a]) || (ascii(head, 4, 8) === "JXL " && head[3] === 0x0c)) return { ok: false, format: "jxl" };
  // JPEG 2000: the signature box "jP  " (ISO/IEC 15444-1, I.5.1), or a bare codestream FF 4F FF 51.
  if (ascii(head, 4, 8) === "jP  " || startsWith(head, [0xff, 0x4f, 0xff, 0x51])) return { ok: false, format: "jp2" };
  return sniffText(head);
}

/** Markup or plain text (an HTML page renamed to .jpg, an SVG): name it, so nobody is told "unknown" for a web page. */
function sniffText(head: Uint8Array): Sniffed {
  let at = startsWith(head, [0xef, 0xbb, 0xbf]) ? 3 : 0; // UTF-8 byte order mark
  while (at < head.length && (head[at] === 0x20 || head[at] === 0x09 || head[at] === 0x0a || head[at] === 0x0d)) at++;
  const text = ascii(head, at, head.length).toLowerCase();
  if (text.startsWith("<svg") || /^<\?xml[\s\S]*<svg/.test(text) || /^<!doctype svg/.test(text)) return { ok: false, format: "svg" };
  if (/^<(!doctype html|html|head|body|script|iframe|meta|!--|div|p\b|a\b|img|style)/.test(text)) return { ok: false, format: "html" };
  if (text.startsWith("<?xml")) return { ok: false, format: "xml" };
  const printable = head.subarray(at).every((b) => b === 0x09 || b === 0x0a || b === 0x0d || (b >= 0x20 && b !== 0x7f));
  return { ok: false, format: printable && head.length > at ? "text" : "unknown" };
}

const NAMES: Record<RejectedFormat, string> = {
  heic: "a HEIC/HEIF photo",
  avif: "an AVIF image",
  gif: "a GIF",
  tiff: "a TIFF",
  svg: "an SVG drawing",
  html: "a web page (HTML)",
  xml: "an XML document",
  pdf: "a PDF",
  bmp: "a BMP bitmap",
  ico: "an icon file",
  psd: "a Photoshop document",
  jxl: "a JPEG XL image",
  jp2: "a JPEG 2000 image",
  text: "a text file",
  unknown: "not an image we can read",
};

/** The sentence a contributor reads when a file's format is refused. */
export function rejectionMessage(format: RejectedFormat): string {
  if (format === "heic")
    return 'HEIC/HEIF photos are not accepted: export the photo as JPEG (most phones and photo apps can: "Most compatible" or "Export as JPEG") and upload that.';
  if (format === "unknown") return "This file is not a JPEG, PNG or WebP photo. Only those three are accepted.";
  return `This file is ${NAMES[format]}. Only JPEG, PNG and WebP photos are accepted.`;
}
