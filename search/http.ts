/**
 * HTTP helpers of the search stand-in: answering, reading bodies (JSON, documents), and checking body fields and
 * query parameters with the service's error codes.
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import type { Doc } from "./engine.ts";
import { ApiError, INDEX_UID_RULE, isValidIndexUid } from "./errors.ts";

/** The service's default payload limit (100 MiB). */
const PAYLOAD_LIMIT = 100 * 1024 * 1024;

export function send(res: ServerResponse, status: number, body?: unknown) {
  if (body === undefined) {
    res.writeHead(status, { "Content-Length": 0 });
    res.end();
    return;
  }
  const text = JSON.stringify(body);
  res.writeHead(status, { "Content-Type": "application/json", "Content-Length": Buffer.byteLength(text) });
  res.end(text);
}

export async function readBody(req: IncomingMessage): Promise<string> {
  let size = 0;
  const chunks: Buffer[] = [];
  for await (const chunk of req as AsyncIterable<Buffer>) {
    size += chunk.length;
    if (size > PAYLOAD_LIMIT) {
      throw new ApiError(413, "payload_too_large", "The provided payload reached the size limit. The maximum accepted payload size is 100 MiB.");
    }
    chunks.push(chunk);
  }
  return Buffer.concat(chunks).toString("utf8");
}

/** A JSON body for the non-document routes: malformed or missing → 400 bad_request (the service's code for these). */
export async function jsonBody(req: IncomingMessage): Promise<unknown> {
  const text = await readBody(req);
  if (text.trim() === "") throw new ApiError(400, "bad_request", "A json payload is missing.");
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new ApiError(400, "bad_request", `Json deserialize error: ${(e as Error).message}`);
  }
}

/** Documents for POST/PUT …/documents: a JSON array (or one object), or NDJSON; else 400 malformed_payload. */
export async function documentsBody(req: IncomingMessage): Promise<Doc[]> {
  const type = (req.headers["content-type"] ?? "application/json").toLowerCase();
  const text = await readBody(req);
  if (text.trim() === "") throw new ApiError(400, "missing_payload", "A json payload is missing.");
  let parsed: unknown;
  if (type.includes("ndjson")) {
    try {
      parsed = text
        .split("\n")
        .filter((l) => l.trim())
        .map((l) => JSON.parse(l) as unknown);
    } catch (e) {
      throw new ApiError(400, "malformed_payload", `The \`ndjson\` payload provided is malformed. \`${(e as Error).message}\`.`);
    }
  } else if (type.includes("json")) {
    try {
      parsed = JSON.parse(text);
    } catch (e) {
      throw new ApiError(
        400,
        "malformed_payload",
        `The \`json\` payload provided is malformed. \`Couldn't serialize document value: ${(e as Error).message}\`.`,
      );
    }
  } else {
    throw new ApiError(
      415,
      "invalid_content_type",
      `The Content-Type \`${type}\` is invalid. Accepted values for the Content-Type header are: \`application/json\`, \`application/x-ndjson\``,
    );
  }
  const list = Array.isArray(parsed) ? parsed : [parsed];
  for (const d of list) {
    if (!d || typeof d !== "object" || Array.isArray(d)) {
      throw new ApiError(
        400,
        "malformed_payload",
        `The \`json\` payload provided is malformed. \`Couldn't serialize document value: invalid type: ${JSON.stringify(d)}, expected a map\`.`,
      );
    }
  }
  return list as Doc[];
}

export const typeName = (v: unknown) => (v === null ? "null" : Array.isArray(v) ? "an array" : typeof v === "object" ? "an object" : `a ${typeof v}`);

export function badType(code: string, field: string, expected: string, value: unknown): never {
  throw new ApiError(400, code, `Invalid value type at \`.${field}\`: expected ${expected}, but found ${typeName(value)}: \`${JSON.stringify(value)}\``);
}

export function rejectUnknown(body: Record<string, unknown>, allowed: readonly string[], where = "") {
  for (const k of Object.keys(body)) {
    if (!allowed.includes(k)) {
      throw new ApiError(400, "bad_request", `Unknown field \`${k}\`${where}: expected one of ${allowed.map((a) => `\`${a}\``).join(", ")}`);
    }
  }
}

export const asObject = (v: unknown): Record<string, unknown> => {
  if (!v || typeof v !== "object" || Array.isArray(v))
    throw new ApiError(400, "bad_request", `Json deserialize error: invalid type: ${typeName(v)}, expected a map`);
  return v as Record<string, unknown>;
};

export const nonNegativeInt = (code: string, field: string, v: unknown): number => {
  if (typeof v !== "number" || !Number.isInteger(v) || v < 0) badType(code, field, "a positive integer", v);
  return v;
};

export const indexUidParam = (raw: string): string => {
  const uid = decodeURIComponent(raw);
  if (!isValidIndexUid(uid)) throw new ApiError(400, "invalid_index_uid", `\`${uid}\` is not a valid index uid. ${INDEX_UID_RULE}`);
  return uid;
};

export const listParam = (params: URLSearchParams, name: string): string[] | null => {
  const v = params.get(name);
  if (v === null || v === "*") return null;
  return v
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
};

export const intParam = (params: URLSearchParams, name: string, fallback: number, code: string): number => {
  const v = params.get(name);
  if (v === null) return fallback;
  const n = Number(v);
  if (!Number.isInteger(n) || n < 0) throw new ApiError(400, code, `Invalid value in parameter \`${name}\`: could not parse \`${v}\` as a positive integer`);
  return n;
};
