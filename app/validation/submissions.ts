/**
 * Input schemas for submissions and reviews: the one allow-list of what a contributor or a moderator may send (anything
 * else in a body, such as state, authorId or role, is dropped). Used by the pages (from form fields) and the API (JSON).
 */
import { z } from "zod";
import { SPEC_KINDS, SPEC_MATERIALS } from "~/domain/specs";
import { LATCH_SIDES, LIMITS, SOURCE_KINDS, SYSTEM_KINDS, type CardProposal } from "~/domain/submissions";

export { LIMITS };

// Control characters never belong in a card (they break queries, CSV and mail); tabs and newlines only in notes.
// eslint-disable-next-line no-control-regex -- control characters are what this checks for
const clean = (s: string) => s.replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/g, "");
const line = (max: number = LIMITS.text) =>
  z
    .string()
    .transform((s) =>
      clean(s)
        .replace(/[\t\r\n]+/g, " ")
        .trim(),
    )
    .pipe(z.string().max(max, `is longer than ${max} characters`));
const optionalLine = (max = 40) =>
  z
    .union([z.string(), z.null()])
    .optional()
    .transform((s) => (s == null ? null : clean(s).replace(/\s+/g, " ").trim() || null))
    .pipe(z.string().max(max, `is longer than ${max} characters`).nullable());
const prose = (max: number) =>
  z
    .string()
    .transform((s) => clean(s).replace(/\r\n?/g, "\n"))
    .pipe(z.string().max(max, `is longer than ${max} characters`));
const slug = z
  .string()
  .max(120)
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, "must be a connector's slug");
const uuid = z.string().regex(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/, "is not a photo id");
const num = z.coerce.number().refine(Number.isFinite, "must be a number");

export const proposalSchema = z.object({
  name: line(120),
  location: line(),
  housing: line().default(""),
  gender: z.enum(["plug", "socket"]),
  system: z.enum(SYSTEM_KINDS),
  matesWith: z
    .union([slug, z.null(), z.literal("")])
    .optional()
    .transform((v) => v || null),
  layout: z.object({
    rows: z.coerce.number().int().min(1).max(LIMITS.rows),
    cols: z.coerce.number().int().min(1).max(LIMITS.cols),
    cavities: z.array(z.object({ cavity: line(12), row: z.coerce.number().int(), col: z.coerce.number().int() })).max(LIMITS.cavities),
    pin1: line(12),
    latch: z.enum(LATCH_SIDES),
  }),
  pins: z
    .array(
      z.object({
        cavity: line(12),
        code: optionalLine(40),
        circuit: line(120).default(""),
        terminal: optionalLine(8),
        goesTo: z
          .union([z.object({ connector: slug, cavity: line(12) }), z.null()])
          .optional()
          .transform((v) => v ?? null),
      }),
    )
    .max(LIMITS.pins, `may have at most ${LIMITS.pins} rows`),
  specs: z
    .array(
      z.object({
        name: line(80),
        min: num,
        // null first: coercion would read null as 0. null is "no upper limit" (an insulation test); omitted is a mistake.
        max: z.union([z.null(), num]),
        unit: line(12),
        between: z.tuple([line(12), line(12)]),
        atC: num.default(20),
        // A source names the standard or handbook and says how it applies: a sentence, not a word.
        source: line(300).default(""),
        conditions: line(LIMITS.conditions).default(""),
        kind: z
          .union([z.enum(SPEC_KINDS), z.literal("")])
          .optional()
          .transform((v) => v || "resistance"),
        material: z
          .union([z.enum(SPEC_MATERIALS), z.literal(""), z.null()])
          .optional()
          .transform((v) => v || null),
      }),
    )
    .max(LIMITS.specs)
    .default([]),
  notes: prose(LIMITS.notes).default(""),
  photos: z
    .array(z.object({ id: uuid, caption: line(200).default(""), credit: line(120).default("") }))
    .max(LIMITS.photos, `may have at most ${LIMITS.photos} photos`)
    .default([]),
}) satisfies z.ZodType<CardProposal, unknown>;

export const familyRequestSchema = z
  .object({
    make: slug,
    name: line(80).pipe(z.string().min(2, "give the family a name")),
    modelRange: line(120).default(""),
    yearFrom: z.coerce.number().int().min(1900).max(2100),
    yearTo: z.coerce.number().int().min(1900).max(2100),
    engine: line(80).default(""),
    cylinders: z.coerce.number().int().min(1).max(12),
    displacementCc: z.coerce.number().int().min(25).max(3000),
    firingOrder: line(40).default(""),
    ignition: line(80).default(""),
  })
  .refine((f) => f.yearFrom <= f.yearTo, { message: "the first year must not be after the last", path: ["yearTo"] });
export type FamilyRequest = z.infer<typeof familyRequestSchema>;

/** POST /api/v1/submissions: start a draft — a new card (family or familyRequest) or an edit of a published card. */
export const createSubmissionBody = z
  .object({
    connector: slug.optional(),
    family: slug.optional(),
    familyRequest: familyRequestSchema.optional(),
    content: proposalSchema.optional(),
    sourceKind: z.union([z.enum(SOURCE_KINDS), z.literal("")]).optional(),
    sourceDetail: prose(1000).optional(),
    summary: prose(1000).optional(),
    idempotencyKey: z
      .string()
      .min(8)
      .max(80)
      .regex(/^[A-Za-z0-9_-]+$/)
      .optional(),
    submit: z.boolean().optional(),
  })
  .refine((b) => [b.connector, b.family, b.familyRequest].filter(Boolean).length === 1, {
    message: "give exactly one of connector (an edit), family (a new card) or familyRequest (a new card for a new family)",
  });

/** PUT/PATCH /api/v1/submissions/:id: change a draft or a returned submission (only these fields; the rest is the server's). */
export const updateSubmissionBody = z
  .object({
    content: proposalSchema.optional(),
    sourceKind: z.union([z.enum(SOURCE_KINDS), z.literal("")]).optional(),
    sourceDetail: prose(1000).optional(),
    summary: prose(1000).optional(),
  })
  .extend({
    version: z.coerce.number().int().min(1),
    action: z.enum(["save", "submit", "withdraw"]).default("save"),
    answer: prose(LIMITS.message).optional(),
  });

/** POST /api/v1/submissions/:id/review: a moderator's decision. */
export const reviewBody = z
  .object({
    version: z.coerce.number().int().min(1),
    decision: z.enum(["approve", "return", "decline"]),
    message: prose(LIMITS.message).default(""),
  })
  .refine((b) => b.decision === "approve" || b.message.trim().length > 0, {
    message: "returning needs a question and declining needs a reason",
    path: ["message"],
  });

export const listSubmissionsQuery = z.object({
  limit: z.coerce.number().int().min(1).max(100).default(20),
  offset: z.coerce.number().int().min(0).default(0),
  state: z.enum(["draft", "in_review", "returned", "declined", "published"]).optional(),
  make: slug.optional(),
  family: slug.optional(),
  mine: z.enum(["1", "true"]).optional(),
});

/**
 * The editor form's field cap: each pin row has 7 fields, a spec row 14, a photo 4, a grid cell 1, and a dozen more: at
 * LIMITS that is about 2 600; 4 000 leaves room. (Its byte cap is the server's, EDITOR_FORM_MAX_BYTES.)
 */
export const EDITOR_FORM_MAX_FIELDS = 4_000;

/**
 * Read the editor's form fields (pins.0.cavity, layout.cell.1.2, specs.0.min, photos.0.caption …) into the shape
 * proposalSchema checks. Layout cells name the cavity at row/column; an empty cell has no cavity.
 */
export function proposalFromForm(form: { get(key: string): unknown; keys(): Iterable<string> }): unknown {
  const get = (k: string) => {
    const v = form.get(k);
    return typeof v === "string" ? v : "";
  };
  // One pass over the field names for all three row lists: with a map-backed form every `get` is then a lookup.
  const ids: Record<"pins" | "specs" | "photos", Set<number>> = { pins: new Set(), specs: new Set(), photos: new Set() };
  for (const k of form.keys()) {
    const m = /^(pins|specs|photos)\.(\d{1,3})\./.exec(k);
    if (m) ids[m[1] as keyof typeof ids].add(Number(m[2]));
  }
  const indexed = (prefix: keyof typeof ids) => [...ids[prefix]].sort((a, b) => a - b);
  const rows = Number(get("layout.rows")) || 0;
  const cols = Number(get("layout.cols")) || 0;
  const cavities: { cavity: string; row: number; col: number }[] = [];
  for (let r = 1; r <= Math.min(rows, LIMITS.rows); r++) {
    for (let c = 1; c <= Math.min(cols, LIMITS.cols); c++) {
      const label = get(`layout.cell.${r}.${c}`).trim();
      if (label) cavities.push({ cavity: label, row: r, col: c });
    }
  }
  return {
    name: get("name"),
    location: get("location"),
    housing: get("housing"),
    gender: get("gender"),
    system: get("system"),
    matesWith: get("matesWith") || null,
    layout: { rows, cols, cavities, pin1: get("layout.pin1"), latch: get("layout.latch") },
    pins: indexed("pins").map((i) => {
      const connector = get(`pins.${i}.goesToConnector`).trim();
      const cavity = get(`pins.${i}.goesToCavity`).trim();
      return {
        cavity: get(`pins.${i}.cavity`),
        code: get(`pins.${i}.code`),
        circuit: get(`pins.${i}.circuit`),
        terminal: get(`pins.${i}.terminal`),
        goesTo: connector && cavity ? { connector, cavity } : null,
      };
    }),
    specs: indexed("specs")
      .filter(
        (i) =>
          get(`specs.${i}.name`).trim() !== "" || get(`specs.${i}.min`) !== "" || get(`specs.${i}.max`) !== "" || get(`specs.${i}.conditions`).trim() !== "",
      )
      .map((i) => ({
        // The "no upper limit" box wins over whatever is left in the greatest-value box.
        name: get(`specs.${i}.name`),
        min: get(`specs.${i}.min`),
        max: get(`specs.${i}.open`) ? null : get(`specs.${i}.max`),
        unit: get(`specs.${i}.unit`),
        between: [get(`specs.${i}.betweenA`), get(`specs.${i}.betweenB`)],
        atC: get(`specs.${i}.atC`) || 20,
        source: get(`specs.${i}.source`),
        conditions: get(`specs.${i}.conditions`),
        kind: get(`specs.${i}.kind`),
        material: get(`specs.${i}.material`),
      })),
    notes: get("notes"),
    photos: indexed("photos")
      .filter((i) => get(`photos.${i}.remove`) === "")
      .map((i) => ({
        id: get(`photos.${i}.id`),
        caption: get(`photos.${i}.caption`),
        credit: get(`photos.${i}.credit`),
      })),
  };
}

/** The family-request fields of the start form (familyRequest.name …), or undefined when none were given. */
export function familyRequestFromForm(form: FormData): unknown {
  const out: Record<string, string> = {};
  for (const [k, v] of form) if (k.startsWith("familyRequest.") && typeof v === "string") out[k.slice("familyRequest.".length)] = v;
  return Object.keys(out).length ? out : undefined;
}

/** /contribute's three ways to start: edit a card, a new card in a family, or a new card asking for a new family. */
const idempotencyKey = z
  .string()
  .max(100)
  .optional()
  .transform((k) => k || undefined);
export const contributeForm = z.discriminatedUnion(
  "intent",
  [
    z.object({
      intent: z.literal("edit"),
      card: z.string({ error: "Choose the card to edit." }).trim().min(1, "Choose the card to edit."),
      key: idempotencyKey,
    }),
    z.object({
      intent: z.literal("new"),
      family: z.string({ error: "Choose the family the connector belongs to." }).trim().min(1, "Choose the family the connector belongs to."),
      key: idempotencyKey,
    }),
    z.object({ intent: z.literal("family-request"), key: idempotencyKey }), // the request itself: familyRequestSchema
  ],
  { error: "Unknown request." },
);
