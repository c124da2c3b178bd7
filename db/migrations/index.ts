import * as library from "./2026-12-01-01-library.ts";
import * as accounts from "./2026-12-01-02-accounts.ts";
import * as contributions from "./2026-12-01-03-contributions.ts";
import * as search from "./2026-12-01-04-search.ts";
import * as searchPrefix from "./2026-12-01-05-search-prefix.ts";
import * as trade from "./2026-12-02-01-trade.ts";

/** Every migration in order. Listed by hand so the same list works under tsx, vitest and a bundle. */
export const migrations = [
  { name: "2026-12-01-01-library", ...library },
  { name: "2026-12-01-02-accounts", ...accounts },
  { name: "2026-12-01-03-contributions", ...contributions },
  { name: "2026-12-01-04-search", ...search },
  { name: "2026-12-01-05-search-prefix", ...searchPrefix },
  { name: "2026-12-02-01-trade", ...trade },
];
