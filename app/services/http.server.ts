/** The one error shape of the JSON API (see API.md) and the small helpers every resource route uses. */
import { env } from "~/env.server";
import { issueSentence, type Issue } from "~/validation/forms";

export type ApiErrorCode =
  | "bad_request"
  | "unknown_colour"
  | "not_signed_in"
  | "forbidden"
  | "not_found"
  | "method_not_allowed"
  | "conflict"
  | "too_large"
  | "unsupported_media_type"
  | "unprocessable"
  | "rate_limited"
  | "unavailable"
  | "insufficient_storage"
  | "internal_error"
  | "request_timeout";

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
export function validationError(issues: Issue[]) {
  const { message, field } = issueSentence(issues);
  return apiError(400, "bad_request", message, field);
}

const MAX_JSON_BYTES = 64 * 1024;

/**
 * Read a JSON request body and validate it: 415 unless it is JSON, 413 past 64 KiB, 400 for malformed JSON or a
 * failed schema. Returns either the parsed value or the Response to send.
 */
export async function readJson<T>(
  request: Request,
  schema: { safeParse: (v: unknown) => { success: true; data: T } | { success: false; error: { issues: { path: PropertyKey[]; message: string }[] } } },
): Promise<{ ok: true; data: T } | { ok: false; response: Response }> {
  const type = request.headers.get("Content-Type") ?? "";
  if (!/^application\/([a-z.+-]*\+)?json\b/i.test(type)) {
    return { ok: false, response: apiError(415, "unsupported_media_type", "Send the body as JSON with Content-Type: application/json.") };
  }
  const declared = Number(request.headers.get("Content-Length") ?? 0);
  if (declared > MAX_JSON_BYTES) return { ok: false, response: apiError(413, "too_large", `The body may be at most ${MAX_JSON_BYTES / 1024} KiB.`) };
  const text = await request.text();
  if (Buffer.byteLength(text) > MAX_JSON_BYTES)
    return { ok: false, response: apiError(413, "too_large", `The body may be at most ${MAX_JSON_BYTES / 1024} KiB.`) };
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

/**
 * A page form's fields, read once into a map: `get` is a lookup, not a scan. (FormData#get walks every entry, so an
 * editor that asked for each row's fields was quadratic in the field count: a 1 MiB form of 250 000 fields held the
 * process for seconds.)
 */
export class FormFields {
  private readonly map = new Map<string, string>();
  constructor(entries: Iterable<[string, string]>) {
    // The first value of a repeated name, as FormData#get gives.
    for (const [k, v] of entries) if (!this.map.has(k)) this.map.set(k, v);
  }
  get(key: string): string | null {
    return this.map.get(key) ?? null;
  }
  keys(): IterableIterator<string> {
    return this.map.keys();
  }
}

/** The editor's form: 1 MiB (a pasted table, 20 000 characters of notes); the server's body watch holds it to the same. */
export const EDITOR_FORM_MAX_BYTES = env.EDITOR_FORM_MAX_BYTES;

/** The status and Retry-After header of a refused repeat (429), for `data(…, tooMany(s))`. */
export function tooMany(retryAfterS: number): { status: 429; headers: Record<string, string> } {
  return { status: 429, headers: { "Retry-After": String(retryAfterS) } };
}

export type FormRead = { ok: true; form: FormFields } | { ok: false; status: 400 | 413 | 415; message: string };

/**
 * Read a url-encoded page form once, refusing at once what is over its caps: 413 past `maxBytes` (the server's body
 * watch also cuts the stream there), 400 past `maxFields` (counted on the raw text before anything is built), 415 for
 * another body type.
 */
export async function readForm(request: Request, caps: { maxBytes: number; maxFields: number }): Promise<FormRead> {
  const type = request.headers.get("Content-Type") ?? "";
  if (!/^application\/x-www-form-urlencoded\b/i.test(type)) return { ok: false, status: 415, message: "Send the form as application/x-www-form-urlencoded." };
  const declared = Number(request.headers.get("Content-Length") ?? 0);
  const tooLarge = { ok: false as const, status: 413 as const, message: `The form may be at most ${Math.round(caps.maxBytes / 1024)} KiB.` };
  if (declared > caps.maxBytes) return tooLarge;
  const text = await request.text();
  if (Buffer.byteLength(text) > caps.maxBytes) return tooLarge;
  let fields = text === "" ? 0 : 1;
  for (let i = text.indexOf("&"); i !== -1 && fields <= caps.maxFields; i = text.indexOf("&", i + 1)) fields++;
  if (fields > caps.maxFields) return { ok: false, status: 400, message: `The form has more than ${caps.maxFields} fields.` };
  return { ok: true, form: new FormFields(new URLSearchParams(text)) };
}
