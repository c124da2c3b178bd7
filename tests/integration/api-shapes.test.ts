// The public API's bodies held to strict schemas (../shared/API.md and its "Additions"): every field named, none extra,
// so a field added for a page (a database id, the face painting) cannot leak into the API unnoticed. Colour words and
// IEC codes are checked elsewhere (trade-api.test.ts); here only the shape. Sources: API.md; IEC 60757 (the `iec` code's
// letters); DIN 72552 (terminal numbers as strings).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { z } from "zod";
import { startServer, type TestServer } from "../support/server";
import { req, where } from "../support/http";

let srv: TestServer;
beforeAll(async () => {
  srv = await startServer();
}, 60_000);
afterAll(async () => {
  await srv?.stop();
});

const slug = z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/);
const iso = z.string().datetime();
const make = z.strictObject({ slug, name: z.string() });
const familySummary = z.strictObject({
  slug,
  name: z.string(),
  make,
  yearFrom: z.number().int(),
  yearTo: z.number().int(),
  engine: z.string(),
  cylinders: z.number().int(),
  firingOrder: z.string(),
  ignition: z.string(),
  displacementCc: z.number(),
  modelRange: z.string(),
  colourSystem: z.string(),
  crankDeg: z.number().nullable(),
  systemVoltage: z.union([z.literal(6), z.literal(12)]),
  earth: z.enum(["negative", "positive"]),
  houseStyle: z.string().nullable(),
});
const family = familySummary
  .extend({
    blurb: z.string(),
    systems: z.array(
      z.strictObject({
        kind: z.string(),
        name: z.string(),
        connectors: z.array(
          z.strictObject({ slug, name: z.string(), pinCount: z.number().int(), location: z.string(), gender: z.enum(["plug", "socket"]), housing: z.string() }),
        ),
      }),
    ),
  })
  .strict();
const cavityRef = z.strictObject({ connector: slug, cavity: z.string() });
const connector = z.strictObject({
  slug,
  name: z.string(),
  family: z.strictObject({ slug, name: z.string(), make, yearFrom: z.number().int(), yearTo: z.number().int() }),
  system: z.string(),
  systemName: z.string(),
  location: z.string(),
  gender: z.enum(["plug", "socket"]),
  housing: z.string(),
  matesWith: slug.nullable(),
  mateName: z.string().nullable(),
  component: z.strictObject({ name: z.string(), kind: z.string() }).nullable(),
  colourSystem: z.string(),
  houseStyle: z.string().nullable(),
  layout: z.strictObject({
    rows: z.number().int(),
    cols: z.number().int(),
    cavities: z.array(z.strictObject({ cavity: z.string(), row: z.number().int(), col: z.number().int() })),
    pin1: z.string(),
    latch: z.enum(["top", "bottom", "left", "right"]),
  }),
  pins: z.array(
    z.strictObject({
      cavity: z.string(),
      colour: z.strictObject({
        code: z.string().nullable(),
        base: z.string().nullable(),
        tracers: z.array(z.string()),
        iec: z
          .string()
          .regex(/^[A-Z]{2,}$/)
          .nullable(),
        description: z.string(),
      }),
      circuit: z.string(),
      terminal: z.string().nullable(),
      goesTo: cavityRef.nullable(),
      destinations: z.array(z.strictObject({ label: z.string(), connector: slug.nullable(), cavity: z.string().nullable() })),
    }),
  ),
  specs: z.array(
    z.strictObject({
      name: z.string(),
      min: z.number(),
      max: z.number().nullable(),
      unit: z.string(),
      between: z.tuple([z.string(), z.string()]),
      atC: z.number().nullable(),
      source: z.string(),
      conditions: z.string().nullable(),
      kind: z.string().nullable(),
      material: z.string().nullable(),
    }),
  ),
  photos: z.array(
    z.strictObject({
      url: z.string(),
      thumbUrl: z.string(),
      width: z.number(),
      height: z.number(),
      thumbWidth: z.number(),
      thumbHeight: z.number(),
      caption: z.string(),
      credit: z.string(),
      licence: z.string(),
    }),
  ),
  revisions: z.array(z.strictObject({ number: z.number().int(), summary: z.string(), publishedAt: iso })),
  notes: z.string(),
  revision: z.strictObject({ number: z.number().int(), publishedAt: iso }),
  bikeChecked: z.number().int(),
  bikeCheckedYears: z.array(z.number().int()),
});
const search = z.strictObject({
  hits: z.array(
    z.strictObject({
      type: z.enum(["family", "connector", "pin"]),
      slug,
      cavity: z.string().nullable(),
      title: z.string(),
      subtitle: z.string(),
      url: z.string(),
      family: z.string(),
      make: z.string(),
    }),
  ),
  facets: z.record(z.string(), z.record(z.string(), z.number().int())),
  total: z.number().int(),
  limit: z.number().int(),
  offset: z.number().int(),
  source: z.enum(["index", "database"]),
  reduced: z.boolean(),
  tookMs: z.number(),
});

const body = async (path: string) => {
  const r = await req(srv, path);
  expect(r.status, where(r)).toBe(200);
  return JSON.parse(r.body) as unknown;
};
const check = (schema: z.ZodType, value: unknown) => {
  const parsed = schema.safeParse(value);
  expect(parsed.success, parsed.success ? "" : JSON.stringify(parsed.error.issues.slice(0, 5))).toBe(true);
};

describe("the API's bodies have exactly their documented fields", () => {
  it("GET /api/v1/families: every family summary", async () => {
    check(z.strictObject({ families: z.array(familySummary), total: z.number().int() }), await body("/api/v1/families?limit=100"));
  });

  it("GET /api/v1/families/:slug, for every demo family", async () => {
    const { families } = (await body("/api/v1/families?limit=100")) as { families: { slug: string }[] };
    expect(families.length).toBeGreaterThan(0);
    for (const f of families) check(z.strictObject({ family }), await body(`/api/v1/families/${f.slug}`));
  });

  it("GET /api/v1/connectors/:slug, for every card of two families (loom side and component side)", async () => {
    let n = 0;
    for (const f of ["rx750-four", "b800-boxer"]) {
      const { family: fam } = (await body(`/api/v1/families/${f}`)) as { family: { systems: { connectors: { slug: string }[] }[] } };
      for (const c of fam.systems.flatMap((s) => s.connectors)) {
        check(z.strictObject({ connector }), await body(`/api/v1/connectors/${c.slug}`));
        n++;
      }
    }
    expect(n).toBeGreaterThan(20);
  });

  it("GET /api/v1/search", async () => {
    check(search, await body("/api/v1/search?q=plug&limit=50"));
    check(search, await body("/api/v1/search?q=coil&type=pin"));
  });
});
