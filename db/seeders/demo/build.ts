import type { LinkParams } from "../../../app/domain/electrics.ts";
import type { FamilySpec, LinkKind, PairSpec } from "./spec.ts";

/** Rows of one family's loom graph, keyed by stable string refs until the seeder gives them ids. */
export interface FamilyRows {
  components: { key: string; kind: string; name: string; system: string | null; location: string }[];
  connectors: {
    slug: string; pairKey: string; side: "owner" | "loom"; name: string; system: string; location: string;
    gender: "plug" | "socket"; housing: string; matesWith: string; rows: number; cols: number;
    cavities: { cavity: string; row: number; col: number }[]; pin1: string; latch: PairSpec["latch"];
    notes: string; owner: string | null;
  }[];
  pins: { ref: string; connector: string | null; component: string | null; cavity: string; code: string | null; circuit: string; terminal: string | null; position: number; fitting?: string | null }[];
  wires: { from: string; to: string; code: string; lengthMm: number | null; sizeMm2: number | null }[];
  links: { component: string; from: string; to: string; kind: LinkKind; label: string; switchId: string | null; positions: string[] | null; ratingA: number | null; params: LinkParams | null }[];
  circuits: FamilySpec["circuits"];
  specs: { connector: string; name: string; min: number; max: number | null; unit: string; betweenA: string; betweenB: string; atC: number; source: string; conditions: string; kind: string; material: string | null }[];
}

const flipLatch = { left: "right", right: "left", top: "top", bottom: "bottom" } as const;

/** Slug of one half of a pair: the family, the pair, and the half's gender. */
export function connectorSlug(family: string, pairKey: string, gender: "plug" | "socket") {
  return `${family}-${pairKey}-${gender}`;
}

/** Expand a family spec into rows. Throws with a precise message when the spec is inconsistent. */
export function buildFamily(f: FamilySpec): FamilyRows {
  const rows: FamilyRows = { components: [], connectors: [], pins: [], wires: [], links: [], circuits: f.circuits, specs: [] };
  const pinRefs = new Set<string>();
  const addPin = (p: FamilyRows["pins"][number]) => {
    if (pinRefs.has(p.ref)) throw new Error(`${f.slug}: pin ${p.ref} defined twice`);
    pinRefs.add(p.ref);
    rows.pins.push(p);
  };
  const netOf = (name: string) => {
    const net = f.nets[name];
    if (!net) throw new Error(`${f.slug}: unknown net "${name}"`);
    return net;
  };

  for (const c of f.components) {
    rows.components.push({ key: c.key, kind: c.kind, name: c.name, system: c.system, location: c.location });
    (c.terminals ?? []).forEach((t, i) => {
      const ref = `${c.key}.${t.label}`;
      // A post that several nets meet on (the battery +) has no single colour of its own.
      const nets = Object.values(f.nets).filter((n) => n.hub === ref || n.terminals?.includes(ref));
      const net = nets.length === 1 ? nets[0] : null;
      addPin({ ref, connector: null, component: c.key, cavity: t.label, code: net?.code ?? null,
        circuit: net?.circuit ?? nets.map((n) => n.circuit).join(", "), terminal: t.terminal ?? null, position: i, fitting: t.fitting ?? null });
    });
  }

  for (const p of f.pairs) {
    const cells = [] as { cavity: string; row: number; col: number }[];
    let n = 0;
    for (let r = 1; r <= p.rows; r++) {
      for (let c = 1; c <= p.cols; c++) {
        if (p.missing?.some(([mr, mc]) => mr === r && mc === c)) continue;
        cells.push({ cavity: String(++n), row: r, col: c });
      }
    }
    const loomGender = p.ownerGender === "plug" ? "socket" : "plug";
    const ownerSlug = connectorSlug(f.slug, p.key, p.ownerGender);
    const loomSlug = connectorSlug(f.slug, p.key, loomGender);
    const base = { pairKey: p.key, system: p.system, location: p.location, housing: p.housing, rows: p.rows, cols: p.cols, pin1: p.pin1 ?? "1", notes: p.notes ?? "" };
    rows.connectors.push({ ...base, slug: ownerSlug, side: "owner", name: `${p.name}, ${p.ownerGender} ${p.ownerWhere}`,
      gender: p.ownerGender, matesWith: loomSlug, cavities: cells, latch: p.latch, owner: p.owner });
    // The loom half seen from its own mating face is the mirror image of the owner half's face.
    rows.connectors.push({ ...base, slug: loomSlug, side: "loom", name: `${p.name}, loom ${loomGender}`, gender: loomGender,
      matesWith: ownerSlug, cavities: cells.map((c) => ({ ...c, col: p.cols + 1 - c.col })), latch: flipLatch[p.latch], owner: null });
    for (const [i, pin] of p.pins.entries()) {
      if (!cells.some((c) => c.cavity === pin.cavity)) throw new Error(`${f.slug}/${p.key}: cavity ${pin.cavity} not in the housing`);
      const net = netOf(pin.net);
      const common = { cavity: pin.cavity, code: net.code, circuit: net.circuit, terminal: pin.terminal ?? null, position: i };
      addPin({ ...common, ref: `${p.key}:${pin.cavity}`, connector: ownerSlug, component: p.owner });
      addPin({ ...common, ref: `${p.key}~loom:${pin.cavity}`, connector: loomSlug, component: null });
    }
    for (const s of p.specs ?? []) {
      rows.specs.push({ connector: s.side === "loom" ? loomSlug : ownerSlug, name: s.name, min: s.min, max: s.max, unit: s.unit,
        betweenA: s.between[0], betweenB: s.between[1], atC: s.atC ?? 20, source: s.source, conditions: s.conditions ?? "", kind: s.kind ?? "resistance",
        material: s.material ?? null });
    }
  }

  for (const c of f.components) {
    for (const l of c.links ?? []) {
      for (const end of [l.from, l.to]) if (!pinRefs.has(end)) throw new Error(`${f.slug}: link ${c.key}.${l.label} names unknown pin ${end}`);
      rows.links.push({ component: c.key, from: l.from, to: l.to, kind: l.kind, label: l.label, switchId: l.switch ?? null,
        positions: l.positions ?? null, ratingA: l.ratingA ?? null, params: l.params ?? null });
    }
  }

  for (const [name, net] of Object.entries(f.nets)) {
    const ends = [
      ...f.pairs.flatMap((p) => p.pins.filter((pin) => pin.net === name).map((pin) => `${p.key}~loom:${pin.cavity}`)),
      ...(net.terminals ?? []),
    ];
    for (const t of net.terminals ?? []) if (!pinRefs.has(t)) throw new Error(`${f.slug}: net ${name} names unknown terminal ${t}`);
    const wire = (from: string, to: string) =>
      rows.wires.push({ from, to, code: net.code, lengthMm: net.lengthMm ?? null, sizeMm2: (net.hub === to ? net.leadsMm2?.[from] : undefined) ?? net.sizeMm2 ?? null });
    for (const t of Object.keys(net.leadsMm2 ?? {})) if (!net.hub || !ends.includes(t)) throw new Error(`${f.slug}: net ${name} sizes a lead to ${t}, which is not on its hub`);
    if (net.hub) {
      if (!pinRefs.has(net.hub)) throw new Error(`${f.slug}: net ${name} hub ${net.hub} unknown`);
      for (const e of ends) if (e !== net.hub) wire(e, net.hub);
    } else if (ends.length === 2) {
      wire(ends[0], ends[1]);
    } else if (ends.length > 2) {
      const key = `splice-${name}`;
      rows.components.push({ key, kind: "splice", name: `Splice (${net.circuit})`, system: null, location: "inside the loom" });
      addPin({ ref: `${key}.S`, connector: null, component: key, cavity: "S", code: net.code, circuit: net.circuit, terminal: null, position: 0 });
      for (const e of ends) wire(e, `${key}.S`);
    } else {
      throw new Error(`${f.slug}: net ${name} has ${ends.length} end(s); a wire needs two`);
    }
  }
  return rows;
}
