import { createReadStream } from "node:fs";
import { stat } from "node:fs/promises";
import { Readable } from "node:stream";
import type { Route } from "./+types/photos.$file";
import { optionalUser } from "~/services/guards.server";
import { methodNotAllowed } from "~/services/http.server";
import { photoForViewer } from "~/services/photos.server";

// Served bytes are always our own re-encoded WebP, and still never sniffed or run as a document (ASVS V12.5.2,
// V14.4.4; QUALITY S11g): nosniff, a CSP that allows nothing, and an image type.
const SAFE = {
  "Content-Type": "image/webp",
  "X-Content-Type-Options": "nosniff",
  "Content-Security-Policy": "default-src 'none'; frame-ancestors 'none'",
  "Cross-Origin-Resource-Policy": "same-origin",
} as const;

const notFound = () =>
  new Response("There is no such photo.", {
    status: 404,
    headers: { "Content-Type": "text/plain; charset=utf-8", "X-Content-Type-Options": "nosniff", "Cache-Control": "private, no-store" },
  });

/** GET /photos/<uuid>.webp or <uuid>.thumb.webp: a published photo to anyone, a draft's only to its owner and moderators (else 404). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const viewer = await optionalUser(request);
  const found = await photoForViewer(params.file, viewer);
  if (!found) return notFound();
  const size = await stat(found.path).then(
    (s) => s.size,
    () => null,
  );
  if (size === null) return notFound();
  const body = Readable.toWeb(createReadStream(found.path)) as ReadableStream<Uint8Array>;
  return new Response(request.method === "HEAD" ? null : body, {
    headers: {
      ...SAFE,
      "Content-Length": String(size),
      // A published photo's bytes never change under its id; a draft's must not sit in shared caches.
      "Cache-Control": found.published ? "public, max-age=31536000, immutable" : "private, no-store",
    },
  });
}

export const action = () => methodNotAllowed("GET, HEAD");
