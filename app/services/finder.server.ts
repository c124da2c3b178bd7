/** The colour finder over the whole library: one index, rebuilt when the library changes. */
import { Connector, Family, Pin, System } from "~db/models/index.ts";
import { buildFinderIndex, findConnectors, readWires, type FinderConnector, type FinderIndex, type FinderQuery } from "~/domain/colour-finder";
import { decodeColour, type ColourSystemId } from "~/domain/colours";
import { ensureDatabase } from "./database.server";
import { isSlug } from "~/validation/library";

let index: Promise<FinderIndex> | null = null;

/** Forget the index (after a card is published). */
export function forgetFinderIndex() {
  index = null;
}

async function build(): Promise<FinderIndex> {
  await ensureDatabase();
  const [families, systems, connectors, pins] = await Promise.all([Family.findAll(), System.findAll(), Connector.findAll(), Pin.findAll()]);
  const fam = new Map(families.map((f) => [f.id, f]));
  const sys = new Map(systems.map((s) => [s.id, s.kind]));
  const byConnector = new Map<number, Pin[]>();
  for (const p of pins) if (p.connectorId) (byConnector.get(p.connectorId) ?? byConnector.set(p.connectorId, []).get(p.connectorId)!).push(p);
  const list: FinderConnector[] = connectors.map((c) => {
    const f = fam.get(c.familyId)!;
    return {
      slug: c.slug, name: c.name, family: f.slug, familyName: f.name, system: sys.get(c.systemId) ?? "", gender: c.gender,
      pins: (byConnector.get(c.id) ?? []).map((p) => {
        const d = p.colourCode ? decodeColour(p.colourCode, f.colourSystem as ColourSystemId) : null;
        return { cavity: p.cavity, code: p.colourCode, colours: d?.ok ? d.value.colours : [] };
      }),
    };
  });
  return buildFinderIndex(list);
}

/**
 * Rank the library's connectors for the colours a rider sees on a cut-off plug. A rider who names their family
 * most likely reads the codes off its own diagram: that family's notation is used when every code parses in it.
 */
export async function findByColours(query: FinderQuery) {
  index ??= build().catch((e) => { index = null; throw e; });
  let notation = query.notation;
  if (!notation && query.family && isSlug(query.family)) {
    const fam = await Family.findOne({ where: { slug: query.family } });
    const own = fam?.colourSystem as FinderQuery["notation"] | undefined;
    if (own && own !== "auto" && readWires(query.wires, own).ok) notation = own;
  }
  const started = performance.now();
  const result = findConnectors(await index, { ...query, notation: notation ?? "auto" });
  return { result, tookMs: Math.round((performance.now() - started) * 100) / 100 };
}
