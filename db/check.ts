import { decodeColour, houseFor, type ColourSystemId } from "../app/domain/colours/index.ts";
import { layoutProblems } from "../app/domain/connector-face.ts";
import { resolveSwitches } from "../app/domain/loom-graph.ts";
import type { Transaction } from "sequelize";
import { Circuit, Family, Make, type Pin } from "./models/index.ts";
import { loadFamilyGraph } from "./graph.ts";

/**
 * Every inconsistency in the library (or one family of it), as sentences; empty when the data holds together. Inside a
 * transaction it sees that transaction's writes, so a publish can check what it is about to commit.
 */
export async function checkLibrary(opts: { familyId?: number; transaction?: Transaction } = {}): Promise<string[]> {
  const { transaction } = opts;
  const problems: string[] = [];
  const families = await Family.findAll({
    where: opts.familyId ? { id: opts.familyId } : {},
    include: [{ model: Make, as: "make" }],
    order: [["id", "ASC"]],
    transaction,
  });
  for (const family of families) {
    const say = (s: string) => problems.push(`${family.slug}: ${s}`);
    const { graph, pins, wires, connectors, components, links } = await loadFamilyGraph(family.id, transaction);
    const pinById = new Map(pins.map((p) => [p.id, p]));
    const connById = new Map(connectors.map((c) => [c.id, c]));
    const where = (p: Pin) =>
      p.connectorId ? `${connById.get(p.connectorId)?.slug} cavity ${p.cavity}` : `terminal ${p.cavity} of component #${p.componentId}`;
    const system = family.colourSystem as ColourSystemId;
    // Codes are checked in the make's house: without it a jis family would accept every Japanese-style house's codes.
    const houseStyle = houseFor(family.colourSystem, family.make?.houseStyle);

    for (const c of connectors) {
      for (const problem of layoutProblems({ rows: c.rows, cols: c.cols, cavities: c.cavities, pin1: c.pin1, latch: c.latch })) say(`${c.slug}: ${problem}`);
      const cavities = new Set(c.cavities.map((x) => x.cavity));
      const own = pins.filter((p) => p.connectorId === c.id);
      const used = new Set<string>();
      for (const p of own) {
        if (!cavities.has(p.cavity)) say(`${c.slug}: cavity ${p.cavity} does not exist in the housing`);
        if (used.has(p.cavity)) say(`${c.slug}: cavity ${p.cavity} is used twice`);
        used.add(p.cavity);
      }
      const mate = c.matesWithId ? connById.get(c.matesWithId) : undefined;
      if (c.matesWithId && !mate) say(`${c.slug}: mates with a connector of another family or none`);
      if (mate) {
        if (mate.matesWithId !== c.id) say(`${c.slug} mates with ${mate.slug}, but not the other way round`);
        if (mate.gender === c.gender) say(`${c.slug} and ${mate.slug} are both ${c.gender}s`);
        for (const p of own) {
          const q = pins.find((x) => x.connectorId === mate.id && x.cavity === p.cavity);
          if (!q) say(`${c.slug} cavity ${p.cavity} has no partner in ${mate.slug}`);
          else if (q.colourCode !== p.colourCode) say(`${c.slug} cavity ${p.cavity} is ${p.colourCode} but ${mate.slug} says ${q.colourCode}`);
        }
      }
      // A loom-side half carries at most one wire per cavity (none while a contributed card does not yet say where it
      // goes; circuits that need the wire are checked below); a component-side half none.
      for (const p of own) {
        const n = wires.filter((w) => w.fromPinId === p.id || w.toPinId === p.id).length;
        if (!c.componentId && n > 1) say(`${c.slug} cavity ${p.cavity} has ${n} wires (expected at most 1)`);
        if (c.componentId && n !== 0 && !links.some((l) => l.fromPinId === p.id || l.toPinId === p.id))
          say(`${c.slug} cavity ${p.cavity} leads nowhere inside its component`);
      }
    }

    for (const w of wires) {
      const ends = [pinById.get(w.fromPinId), pinById.get(w.toPinId)];
      for (const end of ends) {
        if (!end) {
          say(`wire #${w.id} ends on a pin of another family`);
          continue;
        }
        if (end.colourCode && end.colourCode !== w.colourCode) say(`wire #${w.id} is ${w.colourCode} but ${where(end)} says ${end.colourCode}`);
      }
    }

    const codes = new Set([...pins.map((p) => p.colourCode), ...wires.map((w) => w.colourCode)].filter((c): c is string => !!c));
    for (const code of codes) {
      const r = decodeColour(code, system, { houseStyle });
      if (!r.ok) say(`colour "${code}" does not parse in the family's notation (${system}): ${r.error.message}`);
    }

    const compByKey = new Map(components.map((c) => [c.key, c]));
    for (const circuit of await Circuit.findAll({ where: { familyId: family.id }, transaction })) {
      const sw = resolveSwitches(circuit.switches);
      if (!sw.ok) {
        say(`circuit ${circuit.slug}: ${sw.error}`);
        continue;
      }
      for (const v of circuit.via) {
        const dot = v.indexOf(".");
        const comp = compByKey.get(v.slice(0, dot));
        const link = comp && links.find((l) => l.componentId === comp.id && l.label === v.slice(dot + 1));
        if (!link) {
          say(`circuit ${circuit.slug}: names ${v}, which is not a link of the loom`);
          continue;
        }
        const edge = graph.edges.find((e) => e.id === `l${link.id}`)!;
        if (!graph.loop(String(circuit.fromPinId), edge, String(circuit.toPinId), sw.value)) {
          say(
            `circuit ${circuit.slug} does not close through ${v} with ${Object.entries(sw.value)
              .map(([k, x]) => `${k} ${x}`)
              .join(", ")}`,
          );
        }
      }
    }
  }
  return problems;
}
