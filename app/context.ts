// What our server entry (app/serve.server.ts) puts in every loader's and action's context.
declare module "react-router" {
  interface AppLoadContext {
    ip?: string;
    /** This response's Content-Security-Policy nonce (app/services/csp.server.ts; used by app/entry.server.tsx). */
    cspNonce?: string;
    /** This request's id: logged with any unexpected error (app/entry.server.tsx) and shown on the error page. */
    requestId?: string;
  }
}
export {};
