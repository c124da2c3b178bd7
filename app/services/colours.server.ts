/** Decoding a colour code for GET /api/v1/colours/decode and the /colours page: in a make's notation and house style when one is named. */
import { Make } from "~db/models/index.ts";
import { SYSTEM_NAMES, decodeColour, houseFor, type ColourSystemId, type DecodedColour, type HouseStyleId } from "~/domain/colours";
import { isSlug } from "~/validation/library";

export interface MakeColourStyle {
  slug: string;
  name: string;
  notation: ColourSystemId;
  /** Null when the make names no house (or one of another notation): the notation's usual reading. */
  houseStyle: HouseStyleId | null;
}

/** A make's notation and house style, or null when there is no such make. */
export async function makeColourStyle(slug: string): Promise<MakeColourStyle | null> {
  if (!isSlug(slug)) return null;
  const make = await Make.findOne({ where: { slug } });
  if (!make) return null;
  return { slug: make.slug, name: make.name, notation: make.colourSystem as ColourSystemId, houseStyle: houseFor(make.colourSystem, make.houseStyle) };
}

export type DecodeAnswer =
  | { ok: true; value: DecodedColour & { make?: { slug: string; name: string; houseStyle: HouseStyleId | null } } }
  | { ok: false; status: 400 | 404; code: "unknown_colour" | "bad_request" | "not_found"; message: string; field: string };

/**
 * Decode a code as the API and the page do. With a make, in its notation and house: `system` may be left out or "auto",
 * and a named system must be the make's (otherwise the rider would get a reading the make never wrote).
 */
export async function decodeForMake(q: { code: string; system?: ColourSystemId | "auto"; make?: string }): Promise<DecodeAnswer> {
  if (!q.make) {
    const r = decodeColour(q.code, q.system ?? "auto");
    return r.ok ? { ok: true, value: r.value } : { ok: false, status: 400, code: r.error.code, message: r.error.message, field: r.error.field ?? "code" };
  }
  const make = await makeColourStyle(q.make);
  if (!make) return { ok: false, status: 404, code: "not_found", message: `There is no make "${q.make}" in the library.`, field: "make" };
  if (q.system && q.system !== "auto" && q.system !== make.notation) {
    return {
      ok: false,
      status: 400,
      code: "bad_request",
      field: "system",
      message: `${make.name} writes ${SYSTEM_NAMES[make.notation]} (${make.notation}), not ${q.system}: leave system out or use ${make.notation}.`,
    };
  }
  const r = decodeColour(q.code, make.notation, { houseStyle: make.houseStyle });
  if (!r.ok) return { ok: false, status: 400, code: r.error.code, message: r.error.message, field: r.error.field ?? "code" };
  return { ok: true, value: { ...r.value, make: { slug: make.slug, name: make.name, houseStyle: make.houseStyle } } };
}
