import * as library from "./2026-12-01-01-library.ts";

/** Every migration in order. Listed by hand so the same list works under tsx, vitest and a bundle. */
export const migrations = [{ name: "2026-12-01-01-library", ...library }];
