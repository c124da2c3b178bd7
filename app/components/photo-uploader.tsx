import { useEffect, useId, useRef, useState } from "react";
import { useRevalidator } from "react-router";

type Status =
  | { kind: "idle" }
  | { kind: "sending"; loaded: number; total: number }
  | { kind: "processing" }
  | { kind: "done"; count: number }
  | { kind: "error"; message: string }
  /** The server or the network ended the upload part-way (408, 413, 5xx, connection closed, timeout). */
  | { kind: "stopped"; reason: string; detail?: string }
  /** The connection went after the whole upload was sent: the photos may or may not have been stored. */
  | { kind: "unknown" }
  | { kind: "cancelled" };

/**
 * Give up waiting a little after the server would (serve.server.ts: requestTimeout 120 s; uploads slower than
 * 10 KB/s after 10 s get a 408 there, QUALITY F7), so the server's own answer normally arrives first.
 */
const UPLOAD_TIMEOUT_MS = 125_000;

const kb = (n: number) => (n >= 1024 * 1024 ? `${(n / (1024 * 1024)).toFixed(1)} MB` : `${Math.max(1, Math.round(n / 1024))} KB`);

/** The server's message from our error shape ({"error": {message}}), if it sent one. */
function serverMessage(xhr: XMLHttpRequest): string | undefined {
  try {
    const body = JSON.parse(xhr.responseText) as { error?: { message?: unknown } };
    if (typeof body.error?.message === "string" && body.error.message) return body.error.message;
  } catch {
    /* not JSON */
  }
  return undefined;
}

/** The server's message from our error shape, or a plain one. */
function errorMessage(xhr: XMLHttpRequest): string {
  const message = serverMessage(xhr);
  if (message) return message;
  if (xhr.status === 413) return "The upload is too large.";
  return xhr.status ? `The upload failed (${xhr.status}). Please try again.` : "The connection was lost before the upload finished. Please try again.";
}

/** Answers that end an upload part-way (the server gave up on it, or failed): why, in a few words. */
function stoppedReason(status: number): string | null {
  if (status === 408) return "it was too slow for the server, which stopped waiting";
  if (status === 413) return "it is larger than the server accepts";
  if (status === 503) return "the server is busy";
  if (status === 507) return "the server has no room for photos right now";
  if (status >= 500) return `the server ran into a problem (${status})`;
  return null;
}

/**
 * Photo upload for a submission. Without JavaScript: a plain multipart form posted to the page (`intent=upload`).
 * With JavaScript: the same form data goes to POST /api/v1/photos with a progress bar, a cancel button and the
 * server's own message on failure; the page's data is revalidated afterwards.
 */
export function PhotoUploader(props: { submissionId: number; remaining: number; action: string; version: number; maxBytes?: number }) {
  const { submissionId, remaining, action, version, maxBytes = 15 * 1024 * 1024 } = props;
  const uid = useId();
  const formRef = useRef<HTMLFormElement>(null);
  const xhrRef = useRef<XMLHttpRequest | null>(null);
  /** Set by the Cancel button, so that an abort from anywhere else reads as an interruption. */
  const cancelledRef = useRef(false);
  const revalidator = useRevalidator();
  const [status, setStatus] = useState<Status>({ kind: "idle" });
  useEffect(
    () => () => {
      cancelledRef.current = true; // leaving the page is not an interruption to report
      xhrRef.current?.abort();
    },
    [],
  );

  const busy = status.kind === "sending" || status.kind === "processing";
  const full = remaining <= 0;

  function onSubmit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (busy) return;
    const form = event.currentTarget;
    const data = new FormData(form);
    const files = data.getAll("photo").filter((f): f is File => f instanceof File && f.size > 0);
    if (files.length === 0) return setStatus({ kind: "error", message: "Choose at least one photo (JPEG, PNG or WebP)." });
    if (files.length > remaining)
      return setStatus({ kind: "error", message: `This submission has room for ${remaining} more photo${remaining === 1 ? "" : "s"}.` });
    const big = files.find((f) => f.size > maxBytes);
    if (big) return setStatus({ kind: "error", message: `“${big.name}” is ${kb(big.size)}; each photo may be at most ${kb(maxBytes)}.` });
    data.set("submission", String(submissionId));
    const xhr = new XMLHttpRequest();
    xhrRef.current = xhr;
    cancelledRef.current = false;
    // Whether every byte went out: a connection lost after that may have stored the photos after all.
    let sent = false;
    xhr.open("POST", "/api/v1/photos");
    xhr.setRequestHeader("Accept", "application/json");
    xhr.timeout = UPLOAD_TIMEOUT_MS;
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) setStatus(e.loaded >= e.total ? { kind: "processing" } : { kind: "sending", loaded: e.loaded, total: e.total });
    };
    xhr.upload.onload = () => {
      sent = true;
      setStatus({ kind: "processing" });
    };
    const stopped = (reason: string, detail?: string) => {
      xhrRef.current = null;
      setStatus({ kind: "stopped", reason, detail });
    };
    xhr.onload = () => {
      xhrRef.current = null;
      const reason = stoppedReason(xhr.status);
      if (xhr.status === 201) {
        setStatus({ kind: "done", count: files.length });
        form.reset();
        revalidator.revalidate();
      } else if (reason) stopped(reason, serverMessage(xhr));
      else setStatus({ kind: "error", message: errorMessage(xhr) });
    };
    // A network error: the server closed the connection (after a limit, or going down) or the network went.
    xhr.onerror = () => {
      if (!sent) return stopped("the connection to the server was closed");
      xhrRef.current = null;
      setStatus({ kind: "unknown" });
      revalidator.revalidate();
    };
    xhr.ontimeout = () => stopped(`there was no answer from the server within ${Math.round(UPLOAD_TIMEOUT_MS / 60_000)} minutes`);
    xhr.onabort = () => {
      if (!cancelledRef.current) return stopped("it was interrupted");
      xhrRef.current = null;
      setStatus({ kind: "cancelled" });
    };
    setStatus({ kind: "sending", loaded: 0, total: files.reduce((n, f) => n + f.size, 0) });
    xhr.send(data);
  }

  const percent = status.kind === "sending" && status.total > 0 ? Math.round((status.loaded / status.total) * 100) : status.kind === "processing" ? 100 : 0;
  const message =
    status.kind === "sending"
      ? `Uploading: ${percent} % (${kb(status.loaded)} of ${kb(status.total)})`
      : status.kind === "processing"
        ? "Uploaded; processing the photos…"
        : status.kind === "done"
          ? `${status.count} photo${status.count === 1 ? "" : "s"} added.`
          : status.kind === "cancelled"
            ? "Upload cancelled: nothing was saved."
            : status.kind === "stopped"
              ? `The upload stopped: ${status.reason}; nothing was saved. Try again.`
              : status.kind === "unknown"
                ? "The connection was lost while the photos were being processed: they may have been added. Check this submission's photos before trying again."
                : "";

  return (
    <form
      ref={formRef}
      method="post"
      encType="multipart/form-data"
      action={action}
      onSubmit={onSubmit}
      className="space-y-3 rounded-md border border-rule bg-white p-3"
      aria-labelledby={`${uid}-title`}
    >
      <h3 id={`${uid}-title`} className="text-lg font-bold">
        Add photos
      </h3>
      <input type="hidden" name="intent" value="upload" />
      <input type="hidden" name="version" value={version} />
      <p id={`${uid}-hint`} className="text-sm text-muted">
        JPEG, PNG or WebP, up to {kb(maxBytes)} each; room for {Math.max(0, remaining)} more. Location and camera details are removed from every photo.
      </p>
      <div>
        <label htmlFor={`${uid}-photo`} className="block text-sm font-semibold">
          Photos
        </label>
        <input
          id={`${uid}-photo`}
          name="photo"
          type="file"
          multiple
          accept="image/jpeg,image/png,image/webp"
          required
          disabled={full || busy}
          aria-describedby={`${uid}-hint`}
          className="mt-1 block w-full max-w-md text-base file:mr-3 file:rounded file:border-2 file:border-ink file:bg-paper file:px-3 file:py-1.5 file:font-semibold"
        />
      </div>
      <div>
        <label htmlFor={`${uid}-caption`} className="block text-sm font-semibold">
          Caption (optional)
        </label>
        <input
          id={`${uid}-caption`}
          name="caption"
          maxLength={200}
          disabled={busy}
          placeholder="e.g. wire side, latch up"
          className="mt-1 block w-full max-w-md rounded border-2 border-ink px-3 py-2 text-base"
        />
      </div>
      <div>
        <label htmlFor={`${uid}-credit`} className="block text-sm font-semibold">
          Credit (optional)
        </label>
        <input
          id={`${uid}-credit`}
          name="credit"
          maxLength={120}
          disabled={busy}
          placeholder="the name to credit, if not yours"
          className="mt-1 block w-full max-w-md rounded border-2 border-ink px-3 py-2 text-base"
        />
      </div>
      <div className="flex items-start gap-2">
        <input id={`${uid}-consent`} name="consent" type="checkbox" value="yes" required disabled={busy} className="mt-1 h-5 w-5 shrink-0 accent-ink" />
        <label htmlFor={`${uid}-consent`} className="text-sm">
          I took these photos or have the right to share them, and I license them under{" "}
          <a href="https://creativecommons.org/licenses/by-sa/4.0/" className="underline" target="_blank" rel="noopener noreferrer">
            CC BY-SA 4.0
          </a>
          . No faces, number plates or addresses are in frame.
        </label>
      </div>
      <div className="flex flex-wrap items-center gap-3">
        <button type="submit" disabled={full || busy} className="rounded bg-ink px-4 py-2 font-semibold text-paper disabled:opacity-50">
          Upload
        </button>
        {busy ? (
          <button
            type="button"
            onClick={() => {
              cancelledRef.current = true;
              xhrRef.current?.abort();
            }}
            className="rounded border-2 border-ink px-4 py-2 font-semibold"
          >
            Cancel
          </button>
        ) : null}
      </div>
      {status.kind === "sending" || status.kind === "processing" ? (
        <progress value={percent} max={100} aria-label="Upload progress" className="block h-3 w-full max-w-md" />
      ) : null}
      <p
        role="status"
        aria-live="polite"
        className={
          status.kind === "stopped" || status.kind === "unknown"
            ? "rounded border-l-4 border-signal bg-white px-3 py-2 text-sm font-semibold text-signal-dark"
            : "text-sm"
        }
      >
        {message}
      </p>
      {status.kind === "stopped" && status.detail ? <p className="text-sm text-muted">The server said: {status.detail}</p> : null}
      {status.kind === "error" ? (
        <p role="alert" className="rounded border-l-4 border-signal bg-white px-3 py-2 font-semibold text-signal-dark">
          {status.message}
        </p>
      ) : null}
      {full ? <p className="text-sm font-semibold">This submission has as many photos as it can take: remove one to add another.</p> : null}
    </form>
  );
}
