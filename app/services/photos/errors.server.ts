/** The photo pipeline's errors: what the client hears (PhotoError, in the API's one error shape) and a full disk. */
import { randomBytes } from "node:crypto";
import { apiError, type ApiErrorCode } from "../http.server";

/** An upload refused or failed in a way the client should hear about: status, API error code, message, field. */
export class PhotoError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly field?: string,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
    this.name = "PhotoError";
  }
}

/** A PhotoError as the API's one error shape; anything else is rethrown (it is a bug, and becomes a 500). */
export function photoErrorResponse(e: unknown): Response {
  if (e instanceof PhotoError) return apiError(e.status, e.code, e.message, e.field, e.headers);
  throw e;
}

export function isDiskFull(e: unknown): boolean {
  const err = e as { code?: string; message?: string; parent?: { code?: string } } | null;
  return !!err && (err.code === "ENOSPC" || err.code === "EDQUOT" || err.parent?.code === "SQLITE_FULL" || /SQLITE_FULL/.test(err.message ?? ""));
}

/** 507 with a plain message; the log line and the message share an error id (ASVS V7.4.1). */
export function diskFull(e: unknown): PhotoError {
  const id = randomBytes(4).toString("hex");
  const err = e as { code?: string; message?: string };
  console.error(`[photos] error ${id}: no space to store an upload (${err.code ?? "SQLITE_FULL"}: ${err.message ?? e})`);
  return new PhotoError(
    507,
    "insufficient_storage",
    `The server has no room for photos right now, so nothing was saved. Please try again later (error id ${id}).`,
    "photo",
  );
}
