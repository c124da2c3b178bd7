/** The one error shape of the JSON API (see API.md) and the small helpers every resource route uses. */

export type ApiErrorCode =
  | "bad_request" | "unknown_colour" | "not_signed_in" | "forbidden" | "not_found" | "method_not_allowed"
  | "conflict" | "too_large" | "unsupported_media_type" | "unprocessable" | "rate_limited" | "unavailable" | "insufficient_storage"
  | "internal_error" | "request_timeout";

/** A JSON error response: {"error": {code, message, field?}}. */
export function apiError(status: number, code: ApiErrorCode, message: string, field?: string, headers?: HeadersInit) {
  return Response.json({ error: { code, message, ...(field ? { field } : {}) } }, { status, headers });
}

/** 405 for a read-only resource route, with the Allow header. */
export function methodNotAllowed(allow = "GET, HEAD") {
  return apiError(405, "method_not_allowed", `This address only answers ${allow}.`, undefined, { Allow: allow });
}

/** A cacheable JSON read: short public caching, and an ETag with a 304 when the client already has it. */
export function cachedJson(request: Request, body: unknown, etag?: string) {
  const headers = new Headers({ "Cache-Control": "public, max-age=60" });
  if (etag) {
    const tag = `"${etag}"`;
    headers.set("ETag", tag);
    if (request.headers.get("If-None-Match") === tag) return new Response(null, { status: 304, headers });
  }
  return Response.json(body, { headers });
}

/** Turn a zod failure into our 400 with the first offending field named. */
export function validationError(issues: { path: PropertyKey[]; message: string }[]) {
  const first = issues[0];
  const field = first?.path.map(String).join(".") || undefined;
  return apiError(400, "bad_request", field ? `${field}: ${first.message}` : first?.message ?? "The request was not understood.", field);
}

const MAX_JSON_BYTES = 64 * 1024;

/**
 * Read a JSON request body and validate it: 415 unless it is JSON, 413 past 64 KiB, 400 for malformed JSON or a
 * failed schema. Returns either the parsed value or the Response to send.
 */
export async function readJson<T>(request: Request, schema: { safeParse: (v: unknown) => { success: true; data: T } | { success: false; error: { issues: { path: PropertyKey[]; message: string }[] } } }):
  Promise<{ ok: true; data: T } | { ok: false; response: Response }> {
  const type = request.headers.get("Content-Type") ?? "";
  if (!/^application\/([a-z.+-]*\+)?json\b/i.test(type)) {
    return { ok: false, response: apiError(415, "unsupported_media_type", "Send the body as JSON with Content-Type: application/json.") };
  }
  const declared = Number(request.headers.get("Content-Length") ?? 0);
  if (declared > MAX_JSON_BYTES) return { ok: false, response: apiError(413, "too_large", `The body may be at most ${MAX_JSON_BYTES / 1024} KiB.`) };
  const text = await request.text();
  if (Buffer.byteLength(text) > MAX_JSON_BYTES) return { ok: false, response: apiError(413, "too_large", `The body may be at most ${MAX_JSON_BYTES / 1024} KiB.`) };
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    return { ok: false, response: apiError(400, "bad_request", "The body is not valid JSON.") };
  }
  const parsed = schema.safeParse(value);
  if (!parsed.success) return { ok: false, response: validationError(parsed.error.issues) };
  return { ok: true, data: parsed.data };
}

/** A domain computation's input error (RangeError with a field) as our 400; anything else is rethrown. */
export function domainError(e: unknown): Response {
  if (e instanceof RangeError) return apiError(400, "bad_request", e.message, (e as RangeError & { field?: string }).field);
  throw e;
}
