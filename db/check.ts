import { decodeColour, type ColourSystemId } from "../app/domain/colours/index.ts";
import { layoutProblems } from "../app/domain/connector-face.ts";
import { LoomGraph, resolveSwitches, type EdgeKind, type GraphEdge } from "../app/domain/loom-graph.ts";
import { Circuit, Component, ComponentLink, Connector, Family, Pin, Wire } from "./models/index.ts";

/** Load one family's loom graph from the database: wires, mated cavities and internal links as edges. */
export async function loadFamilyGraph(familyId: number) {
  const [pins, wires, connectors, components] = await Promise.all([
    Pin.findAll({ where: { familyId } }),
    Wire.findAll({ where: { familyId } }),
    Connector.findAll({ where: { familyId } }),
    Component.findAll({ where: { familyId } }),
  ]);
  const links = await ComponentLink.findAll({ where: { componentId: components.map((c) => c.id) } });
  const byConnectorCavity = new Map(pins.filter((p) => p.connectorId).map((p) => [`${p.connectorId}:${p.cavity}`, p]));
  const edges: GraphEdge[] = [
    ...wires.map((w) => ({ id: `w${w.id}`, a: String(w.fromPinId), b: String(w.toPinId), kind: "wire" as const })),
    ...links.map((l) => ({ id: `l${l.id}`, a: String(l.fromPinId), b: String(l.toPinId), kind: l.kind as EdgeKind, label: l.label, switchId: l.switchId, positions: l.positions })),
  ];
  for (const c of connectors) {
    // Each mated pair once: from the half with the smaller id.
    if (!c.matesWithId || c.matesWithId < c.id) continue;
    for (const p of pins.filter((x) => x.connectorId === c.id)) {
      const other = byConnectorCavity.get(`${c.matesWithId}:${p.cavity}`);
      if (other) edges.push({ id: `m${p.id}-${other.id}`, a: String(p.id), b: String(other.id), kind: "mate" });
    }
  }
  return { graph: new LoomGraph(edges), pins, wires, connectors, components, links };
}

/** Every inconsistency in the library, as sentences; empty when the data holds together. */
export async function checkLibrary(): Promise<string[]> {
  const problems: string[] = [];
  for (const family of await Family.findAll({ order: [["id", "ASC"]] })) {
    const say = (s: string) => problems.push(`${family.slug}: ${s}`);
    const { graph, pins, wires, connectors, components, links } = await loadFamilyGraph(family.id);
    const pinById = new Map(pins.map((p) => [p.id, p]));
    const connById = new Map(connectors.map((c) => [c.id, c]));
    const where = (p: Pin) => (p.connectorId ? `${connById.get(p.connectorId)?.slug} cavity ${p.cavity}` : `terminal ${p.cavity} of component #${p.componentId}`);
    const system = family.colourSystem as ColourSystemId;

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
      // A loom-side half carries exactly one wire per used cavity; a component-side half none.
      for (const p of own) {
        const n = wires.filter((w) => w.fromPinId === p.id || w.toPinId === p.id).length;
        if (!c.componentId && n !== 1) say(`${c.slug} cavity ${p.cavity} has ${n} wires (expected 1)`);
        if (c.componentId && n !== 0 && !links.some((l) => l.fromPinId === p.id || l.toPinId === p.id)) say(`${c.slug} cavity ${p.cavity} leads nowhere inside its component`);
      }
    }

    for (const w of wires) {
      const ends = [pinById.get(w.fromPinId), pinById.get(w.toPinId)];
      for (const end of ends) {
        if (!end) { say(`wire #${w.id} ends on a pin of another family`); continue; }
        if (end.colourCode && end.colourCode !== w.colourCode) say(`wire #${w.id} is ${w.colourCode} but ${where(end)} says ${end.colourCode}`);
      }
    }

    const codes = new Set([...pins.map((p) => p.colourCode), ...wires.map((w) => w.colourCode)].filter((c): c is string => !!c));
    for (const code of codes) {
      const r = decodeColour(code, system);
      if (!r.ok) say(`colour "${code}" does not parse in the family's notation (${system}): ${r.error.message}`);
    }

    const compByKey = new Map(components.map((c) => [c.key, c]));
    for (const circuit of await Circuit.findAll({ where: { familyId: family.id } })) {
      const sw = resolveSwitches(circuit.switches);
      if (!sw.ok) { say(`circuit ${circuit.slug}: ${sw.error}`); continue; }
      for (const v of circuit.via) {
        const dot = v.indexOf(".");
        const comp = compByKey.get(v.slice(0, dot));
        const link = comp && links.find((l) => l.componentId === comp.id && l.label === v.slice(dot + 1));
        if (!link) { say(`circuit ${circuit.slug}: names ${v}, which is not a link of the loom`); continue; }
        const edge = graph.edges.find((e) => e.id === `l${link.id}`)!;
        if (!graph.loop(String(circuit.fromPinId), edge, String(circuit.toPinId), sw.value)) {
          say(`circuit ${circuit.slug} does not close through ${v} with ${Object.entries(sw.value).map(([k, x]) => `${k} ${x}`).join(", ")}`);
        }
      }
    }
  }
  return problems;
}
