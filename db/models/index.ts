export * from "./library.ts";
export * from "./accounts.ts";
