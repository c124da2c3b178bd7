/** The colour finder over the whole library: one index, rebuilt when the library changes. */
import { Connector, Family, Make, Pin, System } from "~db/models/index.ts";
import { buildFinderIndex, findConnectors, type FinderConnector, type FinderIndex, type FinderQuery } from "~/domain/colour-finder";
import { decodeColour, houseFor, type ColourSystemId } from "~/domain/colours";

let index: Promise<FinderIndex> | null = null;

/** Forget the index (after a card is published). */
export function forgetFinderIndex() {
  index = null;
}

async function build(): Promise<FinderIndex> {
  const [families, systems, connectors, pins] = await Promise.all([
    Family.findAll({ include: [{ model: Make, as: "make" }] }),
    System.findAll(),
    Connector.findAll(),
    Pin.findAll(),
  ]);
  const fam = new Map(families.map((f) => [f.id, f]));
  const sys = new Map(systems.map((s) => [s.id, s.kind]));
  const byConnector = new Map<number, Pin[]>();
  for (const p of pins) if (p.connectorId) (byConnector.get(p.connectorId) ?? byConnector.set(p.connectorId, []).get(p.connectorId)!).push(p);
  const list: FinderConnector[] = connectors.map((c) => {
    const f = fam.get(c.familyId)!;
    const notation = f.colourSystem as ColourSystemId;
    // The card's codes and the rider's typed ones are both read the way the family's make writes them.
    const houseStyle = houseFor(f.colourSystem, f.make?.houseStyle);
    return {
      slug: c.slug,
      name: c.name,
      family: f.slug,
      familyName: f.name,
      system: sys.get(c.systemId) ?? "",
      gender: c.gender,
      notation,
      houseStyle,
      pins: (byConnector.get(c.id) ?? []).map((p) => {
        const d = p.colourCode ? decodeColour(p.colourCode, notation, { houseStyle }) : null;
        return { cavity: p.cavity, code: p.colourCode, colours: d?.ok ? d.value.colours : [] };
      }),
    };
  });
  return buildFinderIndex(list);
}

/**
 * Rank the library's connectors for the colours a rider sees on a cut-off plug. Each connector reads the typed codes
 * in its own family's notation and make's house when they all read there (the finder domain decides), so naming a
 * family needs no notation of its own here.
 */
export async function findByColours(query: FinderQuery) {
  index ??= build().catch((e) => {
    index = null;
    throw e;
  });
  const started = performance.now();
  const result = findConnectors(await index, query);
  return { result, tookMs: Math.round((performance.now() - started) * 100) / 100 };
}
