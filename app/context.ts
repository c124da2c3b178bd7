// What our server entry (app/serve.server.ts) puts in every loader's and action's context.
declare module "react-router" {
  interface AppLoadContext {
    ip?: string;
  }
}
export {};
