/**
 * The stand-in's own environment, read and checked once (zod): SEARCH_PORT, SEARCH_DATA_DIR and SEARCH_KEY, each only
 * a default for the matching option of startSearchStandIn. A bad value throws an Error naming the variable; run as
 * `tsx search/server.ts`, that ends the process with the message (exit code 1).
 */
import path from "node:path";
import { fileURLToPath } from "node:url";
import { z } from "zod";

export interface SearchSettings {
  /** SEARCH_PORT, default 7700 (0 picks a free port). */
  port: number;
  /** SEARCH_DATA_DIR, default search/data next to this file. */
  dataDir: string;
  /** SEARCH_KEY; unset or empty: no key. */
  apiKey: string | undefined;
}

const here = path.dirname(fileURLToPath(import.meta.url));
/** An unset or empty variable takes the default (as before: SEARCH_PORT="" is 7700, SEARCH_KEY="" is no key). */
const unsetIfEmpty = (v: unknown) => (v === "" ? undefined : v);
const port = z.preprocess(unsetIfEmpty, z.coerce.number().int().min(0).max(65535).default(7700));

const schema = z.object({
  SEARCH_PORT: port,
  SEARCH_DATA_DIR: z.string().optional(),
  SEARCH_KEY: z.preprocess(unsetIfEmpty, z.string().optional()),
});

let cached: SearchSettings | null = null;

/** The settings from process.env, parsed on the first call. */
export function searchSettings(): SearchSettings {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const name = String(issue.path[0]);
    throw new Error(`${name} must be a port number (0–65535), got ${JSON.stringify(process.env[name])}`);
  }
  cached = { port: parsed.data.SEARCH_PORT, dataDir: parsed.data.SEARCH_DATA_DIR ?? path.join(here, "data"), apiKey: parsed.data.SEARCH_KEY };
  return cached;
}
