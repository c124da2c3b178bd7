/** The one error shape of the JSON API (see API.md) and the small helpers every resource route uses. */

export type ApiErrorCode =
  | "bad_request" | "unknown_colour" | "not_signed_in" | "forbidden" | "not_found" | "method_not_allowed"
  | "conflict" | "too_large" | "unsupported_media_type" | "rate_limited" | "unavailable" | "internal_error";

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
