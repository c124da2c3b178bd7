import { z } from "zod";
import { COLOUR_SYSTEM_IDS, type ColourSystemId } from "~/domain/colours";

const SLUG = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;
const slug = z.string().max(120, "is too long for a slug").regex(SLUG, "must be a lowercase kebab-case slug");

/** Whether a URL segment can be a slug at all; anything else is simply not in the library (404, never a query). */
export function isSlug(value: string | undefined): value is string {
  return typeof value === "string" && value.length <= 120 && SLUG.test(value);
}

/** limit (default 20, max 100) and offset, as every list route takes them. */
export const pageQuery = z.object({
  limit: z.coerce.number().int().min(1).max(100).default(20),
  offset: z.coerce.number().int().min(0).default(0),
});

export const familiesQuery = pageQuery.extend({
  make: slug.optional(),
  year: z.coerce.number().int().min(1900).max(2100).optional(),
});

export const faceQuery = z.object({
  view: z.enum(["mating", "wire"]).default("mating"),
  half: z.enum(["this", "mate"]).default("this"),
});

export const connectorQuery = z.object({ format: z.enum(["json", "csv"]).default("json") });

// system is left undefined when not given, so that with a make the make's notation can stand in for it.
export const decodeQuery = z.object({
  code: z.string().trim().min(1, "give a colour code, e.g. W/R").max(60, "is too long for a colour code"),
  system: z.enum(["auto", ...COLOUR_SYSTEM_IDS] as ["auto", ...ColourSystemId[]]).optional(),
  make: slug.optional(),
});

/** Query-string parameters as a plain object, empty values dropped (a blank form field means "not given"). */
export function searchParams(request: Request): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of new URL(request.url).searchParams) if (v !== "") out[k] = v;
  return out;
}

/** GET /api/v1/search and /search: the words typed, optional filters (all links on the page), a page of results. */
export const searchQuery = pageQuery.extend({
  q: z
    .string()
    .max(200, "is too long for a search")
    .default("")
    // eslint-disable-next-line no-control-regex -- control characters are what this checks for
    .transform((s) => s.replace(/[\u0000-\u001f\u007f]/g, " ").trim()),
  type: z.enum(["family", "connector", "pin"]).optional(),
  make: slug.optional(),
  family: slug.optional(),
  system: z.enum(["ignition", "charging", "starting", "lighting", "signals", "instruments"]).optional(),
  pins: z.coerce.number().int().min(1).max(400).optional(),
});
