export * from "./library.ts";
