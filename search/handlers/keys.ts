/**
 * Bearer key checks: with a key set, every request except GET /health needs `Authorization: Bearer <key>`.
 */
import type { IncomingMessage } from "node:http";
import { ApiError } from "../errors.ts";

export function authorize(apiKey: string | undefined, req: IncomingMessage) {
  if (!apiKey) return;
  const header = req.headers.authorization;
  if (!header) {
    throw new ApiError(401, "missing_authorization_header", "The Authorization header is missing. It must use the bearer authorization method.", "auth");
  }
  const m = /^Bearer (.+)$/.exec(header);
  if (!m || m[1] !== apiKey) throw new ApiError(403, "invalid_api_key", "The provided API key is invalid.", "auth");
}
