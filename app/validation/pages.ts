/**
 * The pages' query strings. A page's address is typed, shared and bookmarked, so what it cannot use falls back to the
 * page's default (zod `.catch`) rather than an error: an unknown `view` shows the mating face, a filter that is not a
 * slug filters nothing. Where a bad value must be refused (a search, a sign-in `next`), the page's own schema says so.
 */
import { z } from "zod";
import { isSlug } from "./library";

const text = (max: number) => z.string().max(max).optional().catch(undefined);
const slugOrNone = z
  .string()
  .optional()
  .transform((v) => (isSlug(v) ? v : undefined))
  .catch(undefined);

/** /connectors/:connector?view=mating|wire&cavity=…&published=<revision> */
export const cardPageQuery = z.object({
  view: z.enum(["mating", "wire"]).default("mating").catch("mating"),
  cavity: text(20),
  published: z.coerce.number().int().positive().optional().catch(undefined),
});

/** /review?make=…&family=… */
export const reviewQuery = z.object({ make: slugOrNone, family: slugOrNone });

/** /?family=… (the home page's "find your family" box, without JavaScript). */
export const homeQuery = z.object({ family: text(120) });

/** /colours?code=…&system=…&make=… (the form as typed; decodeQuery checks it once there is a code). */
export const coloursFormQuery = z.object({
  code: z.string().max(200).default("").catch(""),
  system: z.string().max(20).default("auto").catch("auto"),
  make: z.string().max(120).default("").catch(""),
});

/** /contribute?card=… (start an edit of this card). */
export const contributeQuery = z.object({ card: z.string().max(120).default("").catch("") });
