import { describe, expect, it } from "vitest";
import { rejectionMessage, sniffImage, type RejectedFormat } from "~/domain/image-sniff";

const bytes = (...parts: (number[] | string)[]) => new Uint8Array(parts.flatMap((p) => (typeof p === "string" ? [...p].map((c) => c.charCodeAt(0)) : p)));
const le32 = (n: number) => [n & 0xff, (n >> 8) & 0xff, (n >> 16) & 0xff, (n >>> 24) & 0xff];
const be32 = (n: number) => [(n >>> 24) & 0xff, (n >> 16) & 0xff, (n >> 8) & 0xff, n & 0xff];

describe("S11a/b image sniffing: type by content, never by name (OWASP File Upload Cheat Sheet; ASVS 4.0.3 V12.2.1)", () => {
  it("accepts JPEG by its SOI marker FF D8 followed by a marker's FF (ITU-T T.81, B.1.1.3)", () => {
    expect(sniffImage(bytes([0xff, 0xd8, 0xff, 0xe0, 0, 16], "JFIF"))).toEqual({ ok: true, kind: "jpeg", animated: false });
    expect(sniffImage(bytes([0xff, 0xd8, 0xff, 0xe1, 0, 16], "Exif"))).toEqual({ ok: true, kind: "jpeg", animated: false });
    // FF D8 alone (no following marker) is not enough.
    expect(sniffImage(bytes([0xff, 0xd8, 0x00]))).toMatchObject({ ok: false });
  });

  it("accepts PNG by its 8-byte signature 137 80 78 71 13 10 26 10 (PNG specification, 5.2 PNG signature)", () => {
    expect(sniffImage(bytes([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13], "IHDR"))).toEqual({ ok: true, kind: "png", animated: false });
    // A signature whose line-ending bytes were mangled (the reason they are there) is not PNG.
    expect(sniffImage(bytes([0x89, 0x50, 0x4e, 0x47, 0x0a, 0x1a, 0x0a, 0x00]))).toMatchObject({ ok: false });
  });

  it("accepts WebP as RIFF....WEBP and reads the animation flag of a VP8X header (WebP Container Specification)", () => {
    expect(sniffImage(bytes("RIFF", le32(1000), "WEBP", "VP8 ", le32(980)))).toEqual({ ok: true, kind: "webp", animated: false });
    expect(sniffImage(bytes("RIFF", le32(1000), "WEBP", "VP8L", le32(980)))).toEqual({ ok: true, kind: "webp", animated: false });
    // VP8X flags byte: Rsv Rsv ICC Alpha EXIF XMP Animation Rsv → Animation is 0x02.
    expect(sniffImage(bytes("RIFF", le32(1000), "WEBP", "VP8X", le32(10), [0x02, 0, 0, 0]))).toEqual({ ok: true, kind: "webp", animated: true });
    expect(sniffImage(bytes("RIFF", le32(1000), "WEBP", "VP8X", le32(10), [0x10 | 0x08, 0, 0, 0]))).toEqual({ ok: true, kind: "webp", animated: false });
    // Another RIFF form (WAVE audio) is not WebP.
    expect(sniffImage(bytes("RIFF", le32(1000), "WAVE", "fmt "))).toMatchObject({ ok: false });
  });

  const rejected: [string, Uint8Array, RejectedFormat][] = [
    // ISO/IEC 14496-12 ftyp box with HEIF brands (ISO/IEC 23008-12): a phone's HEIC photo.
    ["HEIC (major brand heic)", bytes(be32(24), "ftyp", "heic", be32(0), "mif1", "heic"), "heic"],
    ["HEIF (major brand mif1)", bytes(be32(24), "ftyp", "mif1", be32(0), "mif1", "miaf"), "heic"],
    ["AVIF (AV1 Image File Format brand avif)", bytes(be32(28), "ftyp", "avif", be32(0), "avif", "mif1", "miaf"), "avif"],
    ["GIF89a (GIF89a specification, 17. Header)", bytes("GIF89a", [1, 0, 1, 0]), "gif"],
    ["GIF87a", bytes("GIF87a", [1, 0, 1, 0]), "gif"],
    // TIFF 6.0, section 2: byte order II or MM, then 42.
    ["TIFF little-endian (II*\\0)", bytes([0x49, 0x49, 0x2a, 0x00, 8, 0, 0, 0]), "tiff"],
    ["TIFF big-endian (MM\\0*)", bytes([0x4d, 0x4d, 0x00, 0x2a, 0, 0, 0, 8]), "tiff"],
    ["BigTIFF (43 in place of 42)", bytes([0x49, 0x49, 0x2b, 0x00, 8, 0, 0, 0]), "tiff"],
    ["SVG", bytes('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), "svg"],
    ["SVG behind an XML declaration and a BOM", bytes([0xef, 0xbb, 0xbf], '<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg"/>'), "svg"],
    ["HTML page named .jpg", bytes("<!DOCTYPE html><html><script>alert(1)</script></html>"), "html"],
    ["HTML fragment with leading whitespace", bytes("\r\n  <script>fetch('/api/v1/me')</script>"), "html"],
    ["PDF (%PDF-)", bytes("%PDF-1.7\n"), "pdf"],
    ["BMP (BM)", bytes("BM", le32(70), [0, 0, 0, 0]), "bmp"],
    ["JPEG XL container (ISO/IEC 18181-2)", bytes(be32(12), "JXL ", [0x0d, 0x0a, 0x87, 0x0a]), "jxl"],
    ["JPEG 2000 signature box (ISO/IEC 15444-1, I.5.1)", bytes(be32(12), "jP  ", [0x0d, 0x0a, 0x87, 0x0a]), "jp2"],
    ["plain text", bytes("just some text, not a photo"), "text"],
    ["random bytes", bytes([0x13, 0x37, 0x00, 0xfe, 0x01, 0x02]), "unknown"],
  ];
  it.each(rejected)("rejects %s and names it", (_what, head, format) => {
    expect(sniffImage(head)).toEqual({ ok: false, format });
    expect(rejectionMessage(format)).toMatch(/JPEG/);
  });

  it("calls an empty file empty", () => {
    expect(sniffImage(new Uint8Array(0))).toEqual({ ok: false, format: "empty" });
  });

  it("tells a HEIC photographer to export as JPEG", () => {
    expect(rejectionMessage("heic")).toMatch(/export the photo as JPEG/i);
  });

  it("a JPEG signature wins over whatever the file goes on to contain (a polyglot is decided by its first bytes; sharp re-encodes it)", () => {
    expect(sniffImage(bytes([0xff, 0xd8, 0xff, 0xdb], "<html><script>alert(1)</script>"))).toEqual({ ok: true, kind: "jpeg", animated: false });
  });
});
