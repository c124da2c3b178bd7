import { z } from "zod";
import { OVER_LIMIT } from "~/domain/bench";
import { SPEC_MATERIALS } from "~/domain/specs";
import { splitWires } from "~/domain/wire-list";

const finite = z.number({ error: "must be a number" }).finite("must be a finite number");

export const finderBody = z.object({
  wires: z.array(z.string().trim().min(1, "an empty wire colour").max(60)).min(1, "give at least one wire colour").max(40, "at most 40 wires"),
  pinCount: z
    .number({ error: "must be a whole number of pins from 1 to 200" })
    .int("must be a whole number of pins from 1 to 200")
    .min(1, "must be a whole number of pins from 1 to 200")
    .max(200, "must be a whole number of pins from 1 to 200")
    .optional(),
  gender: z.enum(["plug", "socket"]).optional(),
  family: z
    .string()
    .max(120)
    .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "must be a family slug, e.g. rx750-four")
    .optional(),
  familyMode: z.enum(["filter", "boost"]).optional(),
  system: z.string().max(40).optional(),
  notation: z.enum(["auto", "jis", "iec", "din", "bs", "en"]).optional(),
  limit: z.number().int().min(1).max(50).optional(),
});

const param = z.string().max(4000).optional();
const blankToUndefined = (v: string | undefined) => (v === undefined || v.trim() === "" ? undefined : v.trim());
/**
 * The finder page's query string (the form, sent with GET so a result has an address), read into the API's body shape
 * and then checked by `finderBody`, the schema POST /api/v1/colour-finder uses: the same input, the same answer.
 */
export const finderQuery = z
  .object({ wires: param, add: param, pinCount: param, gender: param, family: param, familyMode: param, system: param })
  .transform((q) => ({
    wires: [...splitWires(q.wires ?? ""), ...(blankToUndefined(q.add) ? [q.add!.trim()] : [])],
    pinCount: blankToUndefined(q.pinCount) === undefined ? undefined : Number(q.pinCount),
    gender: blankToUndefined(q.gender),
    family: blankToUndefined(q.family),
    familyMode: blankToUndefined(q.familyMode),
    system: blankToUndefined(q.system),
  }));

export const wireSizeBody = z.object({
  currentA: finite.positive("must be more than 0 A").max(1000),
  lengthM: finite.positive("must be more than 0 m").max(100),
  systemV: finite.positive().max(100).default(12),
  maxDropPct: finite.positive().max(50).default(3),
  roundTrip: z.boolean().default(true),
  tempC: finite.min(-50).max(250).default(20),
});

export const benchBody = z.object({
  readings: z
    .array(
      z.object({
        name: z.string().trim().min(1).max(120),
        min: finite,
        // null: no upper limit (an insulation test that must read open); leaving max out is still a mistake.
        max: z.union([finite, z.null()], { error: "must be a number, or null for a spec with no upper limit" }),
        unit: z.string().trim().min(1).max(12),
        // An ohmmeter's "OL" (over limit: open circuit) is a reading too.
        measured: z.union(
          [
            finite,
            z
              .string()
              .regex(/^ol$/i)
              .transform((): typeof OVER_LIMIT => OVER_LIMIT),
          ],
          { error: `must be a number, or "${OVER_LIMIT}" for an open circuit` },
        ),
        tempC: finite.min(-50).max(250).optional().nullable(),
        material: z
          .enum(SPEC_MATERIALS, { error: `must be one of ${SPEC_MATERIALS.join(", ")}` })
          .optional()
          .nullable(),
        copper: z.boolean().optional().nullable(),
      }),
    )
    .min(1, "give at least one reading")
    .max(200),
});

export const diagnoseBody = z.object({
  switches: z.record(z.string(), z.string()).default({}),
  // Checked against the family (which engine states, whether it has points) in the service, with the walk's own messages.
  engine: z.string().max(20).optional(),
  points: z.string().max(20).optional(),
  readings: z
    .array(
      z.object({
        step: z.number().int().min(1),
        // An ohmmeter's "OL" (over limit: open circuit) is accepted as a reading too.
        value: z.union([finite, z.literal("OL"), z.literal("open")]).transform((v) => (typeof v === "number" ? v : Number.POSITIVE_INFINITY)),
      }),
    )
    .max(200),
});
