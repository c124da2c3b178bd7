/**
 * Errors in the hosted search service's shape (../shared/STACK.md §4):
 *   {"message": "Index `nope` not found.", "code": "index_not_found", "type": "invalid_request",
 *    "link": "https://docs.meilisearch.com/errors#index_not_found"}
 * Thrown by the stand-in's handlers as ApiError (status + body), and stored in failed tasks as the bare body.
 */

export type ErrorType = "invalid_request" | "internal" | "auth" | "system";

export interface ErrorBody {
  message: string;
  code: string;
  type: ErrorType;
  link: string;
}

export function errorBody(code: string, message: string, type: ErrorType = "invalid_request"): ErrorBody {
  return { message, code, type, link: `https://docs.meilisearch.com/errors#${code}` };
}

export class ApiError extends Error {
  override name = "ApiError";
  readonly body: ErrorBody;
  constructor(
    readonly status: number,
    code: string,
    message: string,
    type: ErrorType = "invalid_request",
  ) {
    super(message);
    this.body = errorBody(code, message, type);
  }
}

export const indexNotFound = (uid: string) => new ApiError(404, "index_not_found", `Index \`${uid}\` not found.`);

export const INDEX_UID_RULE =
  "Index uid can be an integer or a string containing only alphanumeric characters, hyphens (-) and underscores (_), and can not be more than 400 bytes.";

export const DOCUMENT_ID_RULE =
  "A document identifier can be of type integer or string, only composed of alphanumeric characters (a-z A-Z 0-9), hyphens (-) and underscores (_), and can not be more than 511 bytes.";

export const isValidIndexUid = (uid: unknown): uid is string => typeof uid === "string" && /^[A-Za-z0-9_-]+$/.test(uid) && Buffer.byteLength(uid) <= 400;
