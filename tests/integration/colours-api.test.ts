/**
 * Colour house styles over HTTP, against the production build with a freshly seeded demo library: GET /api/v1/colours/decode
 * with make=<slug>, the house styles in /colours/systems and /families, the /colours page without JavaScript, and which
 * reading the colour finder used for each wire. Demo makes (db/seeders/demo/makes.ts, invented): asagiri writes
 * jis-letters, brennwald din, ashcombe bs.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { z } from "zod";
import { startServer, type TestServer } from "../support/server";
import { client, errorBody, shape } from "./helpers";

const SYSTEM_IDS = ["jis", "iec", "din", "bs", "en"] as const;
const HOUSE_IDS = ["jis-letters", "jis-bl-black", "jis-bl-blue", "jis-caps", "din", "bs", "en"] as const;

// API.md "Colour notation" decode shape plus the additions: houseStyle, warnings, ambiguities[].houseStyle, make.
const decodeBody = z.object({
  input: z.string(),
  system: z.enum(SYSTEM_IDS),
  houseStyle: z.enum(HOUSE_IDS).nullable(),
  base: z.object({ name: z.string(), iec: z.string().nullable() }).nullable(),
  tracers: z.array(z.object({ name: z.string(), iec: z.string().nullable() })),
  colours: z.array(z.string()).min(1),
  iec: z.string().nullable(),
  ambiguities: z.array(z.object({ system: z.enum(SYSTEM_IDS), houseStyle: z.enum(HOUSE_IDS).optional(), reading: z.string().min(1) })),
  warnings: z.array(z.object({ code: z.literal("green_yellow_reserved"), message: z.string().min(1) })),
  make: z.object({ slug: z.string(), name: z.string(), houseStyle: z.enum(HOUSE_IDS).nullable() }).optional(),
});

let server: TestServer;
const { call, getJson } = client(() => server.url);
const decode = (q: string) => getJson(`/api/v1/colours/decode?${q}`, decodeBody);

async function expectError(path: string, status: number) {
  const r = await call(path);
  expect(r.status, `${path} → ${r.status} ${r.body.slice(0, 200)}`).toBe(status);
  expect(r.type).toMatch(/^application\/json\b/);
  return shape(errorBody, JSON.parse(r.body), path).error;
}

beforeAll(async () => {
  server = await startServer();
});

afterAll(async () => {
  await server?.stop();
});

describe("GET /api/v1/colours/decode with make", () => {
  it("decodes in the make's notation and house, with nothing ambiguous, and says which make", async () => {
    // REFERENCE-FACTS 1.3 [from memory]: jis-letters L blue, W white.
    const d = await decode("code=L%2FW&make=asagiri");
    expect(d).toMatchObject({
      system: "jis",
      houseStyle: "jis-letters",
      colours: ["blue", "white"],
      ambiguities: [],
      make: { slug: "asagiri", houseStyle: "jis-letters" },
    });
    // REFERENCE-FACTS 1.2: DIN 47002 bl = blau [published]; the make settles what auto leaves open (Bl black in English shorthand).
    const bl = await decode("code=Bl&make=brennwald");
    expect(bl).toMatchObject({ system: "din", houseStyle: "din", colours: ["blue"], ambiguities: [] });
    // REFERENCE-FACTS 1.5 [from memory]: British U blue, N brown.
    expect(await decode("code=UN&make=ashcombe")).toMatchObject({ system: "bs", houseStyle: "bs", colours: ["blue", "brown"], ambiguities: [] });
  });

  it("refuses a code the make's house does not write: Bl is no jis-letters code", async () => {
    // REFERENCE-FACTS 1.3 [from memory]: that house writes B black and L blue.
    const err = await expectError("/api/v1/colours/decode?code=Bl&make=asagiri", 400);
    expect(err).toMatchObject({ code: "unknown_colour", field: "code" });
    expect(err.message).toContain("jis-letters");
  });

  it("without a make lists every Japanese-style house's reading of Bl/W, each naming its house", async () => {
    // REFERENCE-FACTS 5 [from memory]: Bl is black in one house, blue in another.
    const d = await decode("code=Bl%2FW&system=jis");
    expect([d.houseStyle, d.colours]).toEqual(["jis-bl-black", ["black", "white"]]);
    expect(d.ambiguities).toEqual([{ system: "jis", houseStyle: "jis-bl-blue", reading: "blue with white tracer" }]);
    const auto = await decode("code=Bl");
    expect(auto.system).toBe("din");
    expect(auto.ambiguities.filter((a) => a.system === "jis").map((a) => [a.houseStyle, a.reading])).toEqual([
      ["jis-bl-black", "black"],
      ["jis-bl-blue", "blue"],
    ]);
  });

  it("system may be left out, auto, or the make's own; another system → 400 naming system", async () => {
    // Our API decision (DEVELOPERS.md decision log, house styles).
    for (const q of ["code=L&make=asagiri", "code=L&make=asagiri&system=auto", "code=L&make=asagiri&system=jis"]) {
      expect((await decode(q)).colours, q).toEqual(["blue"]);
    }
    const err = await expectError("/api/v1/colours/decode?code=L&make=asagiri&system=din", 400);
    expect(err).toMatchObject({ code: "bad_request", field: "system" });
    expect(err.message).toContain("jis");
  });

  it("an unknown make → 404, a malformed one → 400, both naming make; an empty make means none", async () => {
    // API.md conventions: 404 unknown slug, 400 bad input, one error shape.
    expect(await expectError("/api/v1/colours/decode?code=W&make=no-such-make", 404)).toMatchObject({ code: "not_found", field: "make" });
    for (const bad of ["Not_A_Slug", "asagiri%20", "-x", "a".repeat(121)]) {
      expect(await expectError(`/api/v1/colours/decode?code=W&make=${bad}`, 400), bad).toMatchObject({ code: "bad_request", field: "make" });
    }
    expect((await decode("code=W%2FR&make=")).make).toBeUndefined();
  });

  it("English words are English, with or without a make of another notation", async () => {
    // Common practice: brown is brown, never the British B+R+O+W+N (REFERENCE-FACTS 1.5 letters).
    expect(await decode("code=BROWN")).toMatchObject({ system: "en", colours: ["brown"], ambiguities: [] });
    expect(await decode("code=Red%20w%2F%20White%20stripe")).toMatchObject({ system: "en", colours: ["red", "white"], ambiguities: [] });
    const err = await expectError("/api/v1/colours/decode?code=brown&make=ashcombe", 400);
    expect(err.code).toBe("unknown_colour");
    expect(err.message).toMatch(/English/);
  });

  it("flags green with yellow: IEC 60445 keeps it for the protective conductor", async () => {
    // IEC 60445 (REFERENCE-FACTS 5 [published]); IEC 60757 clause 5.1 (REFERENCE-FACTS 1.1).
    for (const q of ["code=G%2FY&make=asagiri", "code=GY&make=ashcombe", "code=gn%2Fge&make=brennwald", "code=GNYE", "code=G%2FY"]) {
      const d = await decode(q);
      expect(
        d.warnings.map((w) => w.code),
        q,
      ).toEqual(["green_yellow_reserved"]);
      expect(d.warnings[0].message, q).toMatch(/IEC 60445/);
    }
    expect((await decode("code=G%2FW&make=asagiri")).warnings).toEqual([]);
  });
});

describe("house styles in the other reads", () => {
  it("GET /api/v1/colours/systems lists each notation's house styles (four for jis)", async () => {
    // REFERENCE-FACTS 1.3 and 5 [from memory] for the jis houses.
    const body = await getJson(
      "/api/v1/colours/systems",
      z.object({
        systems: z.array(
          z.object({
            id: z.enum(SYSTEM_IDS),
            houseStyles: z.array(
              z.object({ id: z.enum(HOUSE_IDS), name: z.string(), codes: z.array(z.object({ code: z.string(), colour: z.string() })).min(1) }),
            ),
          }),
        ),
      }),
    );
    const of = (id: string) => body.systems.find((s) => s.id === id)!.houseStyles.map((h) => h.id);
    expect(of("jis")).toEqual(["jis-letters", "jis-bl-black", "jis-bl-blue", "jis-caps"]);
    expect([of("din"), of("bs"), of("en"), of("iec")]).toEqual([["din"], ["bs"], ["en"], []]);
  });

  it("families carry their make's house style (API.md additions)", async () => {
    // db/seeders/demo/makes.ts: invented makes with house styles jis-letters, jis-bl-black, din, bs.
    const { families } = await getJson(
      "/api/v1/families?limit=100",
      z.object({ families: z.array(z.object({ slug: z.string(), make: z.object({ slug: z.string() }), houseStyle: z.enum(HOUSE_IDS).nullable() })) }),
    );
    const want: Record<string, string> = { asagiri: "jis-letters", kiriyama: "jis-bl-black", brennwald: "din", ashcombe: "bs" };
    expect(families.length).toBeGreaterThan(0);
    for (const f of families) expect(f.houseStyle, f.slug).toBe(want[f.make.slug]);
    const one = await getJson("/api/v1/families/rx750-four", z.object({ family: z.object({ houseStyle: z.enum(HOUSE_IDS).nullable() }) }));
    expect(one.family.houseStyle).toBe("jis-letters");
  });
});

describe("the /colours page without JavaScript", () => {
  const page = async (q: string) => {
    const r = await call(`/colours?${q}`);
    expect(r.status, q).toBe(200);
    return r.body;
  };

  it("offers every make and decodes in the chosen one's house", async () => {
    const html = await page("code=L%2FW&make=asagiri");
    for (const slug of ["asagiri", "brennwald", "ashcombe"]) expect(html).toContain(`value="${slug}"`);
    expect(html).toMatch(/blue with white tracer/);
    expect(html).toMatch(/house style jis-letters/);
  });

  it("shows the house's refusal, the other houses' readings, and the green-and-yellow caution", async () => {
    // REFERENCE-FACTS 1.3 / 5 [from memory]; IEC 60445 (REFERENCE-FACTS 5 [published]).
    expect(await page("code=Bl&make=asagiri")).toMatch(/role="alert"[^>]*>[^<]*&quot;Bl&quot;/);
    const jis = await page("code=Bl%2FW&system=jis");
    expect(jis).toContain("jis-bl-blue");
    expect(jis).toMatch(/blue with white tracer/);
    expect(await page("code=G%2FY&make=asagiri")).toMatch(/data-warning="green_yellow_reserved"[^>]*>.*IEC 60445/);
  });

  it("names an unknown make instead of failing", async () => {
    expect(await page("code=W&make=no-such-make")).toContain("There is no make");
  });
});

describe("the colour finder says which reading it used", () => {
  const readAs = z.object({
    system: z.enum(SYSTEM_IDS),
    houseStyle: z.enum(HOUSE_IDS).nullable(),
    colours: z.array(z.string()).min(1),
    words: z.string().min(1),
  });
  // API.md colour finder shape, plus matches[].readAs (null where the wire has no cavity).
  const finderBody = z.object({
    candidates: z.array(
      z.object({
        connector: z.object({ slug: z.string(), name: z.string(), family: z.string() }),
        score: z.number().min(0).max(1),
        matches: z.array(
          z.object({ wire: z.string(), cavity: z.string().nullable(), pinColour: z.string().nullable(), quality: z.string(), readAs: readAs.nullable() }),
        ),
      }),
    ),
  });
  const find = async (body: unknown) => {
    const r = await call("/api/v1/colour-finder", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
    expect(r.status, r.body.slice(0, 300)).toBe(200);
    return shape(finderBody, JSON.parse(r.body), "colour-finder");
  };

  it("with a family, every match is read in that family's house", async () => {
    // rx750-four ignition unit plug (db/seeders/demo/makes.ts, invented): O/W, B, B/Y, B/L in jis-letters (REFERENCE-FACTS 1.3).
    const { candidates } = await find({ wires: ["B/Y", "O/W", "B/L"], family: "rx750-four" });
    expect(candidates[0].connector.slug).toMatch(/^rx750-four-ignition-unit-(plug|socket)$/);
    for (const m of candidates[0].matches) {
      expect(m.quality, m.wire).toBe("exact");
      expect(m.readAs, m.wire).toMatchObject({ system: "jis", houseStyle: "jis-letters" });
    }
    expect(candidates[0].matches.find((m) => m.wire === "B/L")!.readAs!.words).toBe("black with blue tracer");
  });

  it("with no family, each connector reads the codes in its own maker's house", async () => {
    // Ashcombe writes the older British code (REFERENCE-FACTS 1.5 [from memory]): NW brown with white, WU white with blue.
    const { candidates } = await find({ wires: ["NW", "WU", "B"] });
    const british = candidates.filter((c) => c.connector.family === "sovereign-650");
    expect(british.length).toBeGreaterThan(0);
    expect(british[0].matches.filter((m) => m.cavity).every((m) => m.readAs?.houseStyle === "bs")).toBe(true);
    for (const c of candidates) for (const m of c.matches) if (m.cavity === null) expect(m.readAs).toBeNull();
  });

  it("the finder page shows the reading beside each wire and the battery caution, without JavaScript", async () => {
    const r = await call("/finder?wires=B%2FY%0AO%2FW&family=rx750-four");
    expect(r.status).toBe(200);
    expect(r.body).toMatch(/data-read-as="jis-letters"[^>]*>jis-letters: black with yellow tracer/);
    // REFERENCE-FACTS 6: disconnect the battery's earth lead first (app/domain/cautions.ts), and meter before probing.
    expect(r.body).toMatch(/aria-label="Safety cautions"/);
    expect(r.body).toMatch(/Disconnect the battery(&#x27;|')s earth lead first/);
  });
});
