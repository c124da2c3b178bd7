/**
 * The server's HTML rendering: React Router's default Node entry (streaming, bots and SPA mode wait for all content),
 * plus the Content-Security-Policy nonce of app/services/csp.server.ts. The nonce comes from the load context (made per
 * request in app/serve.server.ts); it goes on every inline script React Router renders and into the response's policy.
 */
import { PassThrough } from "node:stream";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isbot } from "isbot";
import type { RenderToPipeableStreamOptions } from "react-dom/server";
import { renderToPipeableStream } from "react-dom/server";
import type { AppLoadContext, EntryContext, HandleErrorFunction } from "react-router";
import { ServerRouter } from "react-router";
import { documentCsp, newNonce } from "./services/csp.server";
import { startApp } from "./startup.server";

// The composition root, for app/serve.server.ts to call before it listens (build.entry.module.startApp). Under the dev
// server (`npm run dev`) nothing else starts the app, so this module does it as it loads.
export { startApp, stopApp } from "./startup.server";
if (import.meta.env.DEV) await startApp();

export const streamTimeout = 5_000;

/**
 * An unexpected error in a loader or action: logged with the request's id, which the error page shows (root.tsx), so a
 * rider's report can be matched with the log line. The page itself says nothing about the error (ASVS V7.4.1).
 */
export const handleError: HandleErrorFunction = (error, { request, context }) => {
  if (request.signal.aborted) return; // the client went away: nothing went wrong on our side
  const id = (context as AppLoadContext).requestId ?? "-";
  console.error(`[error ${id}] ${request.method} ${new URL(request.url).pathname}:`, error);
};

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  loadContext: AppLoadContext,
) {
  // https://httpwg.org/specs/rfc9110.html#HEAD
  if (request.method.toUpperCase() === "HEAD") return new Response(null, { status: responseStatusCode, headers: responseHeaders });
  const nonce = loadContext.cspNonce ?? newNonce();
  responseHeaders.set("Content-Security-Policy", documentCsp(nonce));

  return new Promise((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    // Bots and SPA-mode renders wait for all content (react.dev, renderToPipeableStream, "waiting for all content").
    const readyOption: keyof RenderToPipeableStreamOptions = (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";
    // Abort the render after streamTimeout, leaving time to flush the rejected boundaries.
    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000);

    const { pipe, abort } = renderToPipeableStream(<ServerRouter context={routerContext} url={request.url} nonce={nonce} />, {
      nonce,
      [readyOption]() {
        shellRendered = true;
        const body = new PassThrough({
          final(callback) {
            clearTimeout(timeoutId);
            timeoutId = undefined;
            callback();
          },
        });
        const stream = createReadableStreamFromReadable(body);
        responseHeaders.set("Content-Type", "text/html");
        pipe(body);
        resolve(new Response(stream, { headers: responseHeaders, status: responseStatusCode }));
      },
      onShellError(error: unknown) {
        reject(error);
      },
      onError(error: unknown) {
        responseStatusCode = 500;
        // Errors while streaming inside the shell are logged here; shell errors reject and are logged by React Router.
        if (shellRendered) console.error(error);
      },
    });
  });
}
