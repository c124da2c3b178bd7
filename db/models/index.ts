export * from "./library.ts";
export * from "./accounts.ts";
export * from "./contributions.ts";
