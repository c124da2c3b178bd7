/** Circuits of a family: the walk (probe points and expectations) and the diagnosis, from the stored loom graph. */
import { Circuit, Family, Make, SpecValue, System, Wire } from "~db/models/index.ts";
import { loadFamilyGraph } from "~db/graph.ts";
import { diagnose, potentials, walkCircuit, type Reading, type WalkNode } from "~/domain/circuit-walk";
import { decodeColour, type ColourSystemId } from "~/domain/colours";
import { nominalLoadA } from "~/domain/loom-planner";
import { resolveSwitches, type GraphEdge, type SwitchState } from "~/domain/loom-graph";
import { wastedSparkPairs } from "~/domain/wasted-spark";
import { ensureDatabase } from "./database.server";
import { isSlug } from "~/validation/library";

type Loaded = Awaited<ReturnType<typeof load>>;
// The library changes only when a card is published; `forgetFamilyGraph` is called then.
const cache = new Map<string, Promise<Loaded | null>>();

/** Drop a family's cached graph (after its cards change). */
export function forgetFamilyGraph(slug?: string) {
  if (slug) cache.delete(slug);
  else cache.clear();
}

async function load(slug: string) {
  if (!isSlug(slug)) return null;
  await ensureDatabase();
  const family = await Family.findOne({ where: { slug }, include: [{ model: Make, as: "make" }] });
  if (!family) return null;
  const g = await loadFamilyGraph(family.id);
  const systems = await System.findAll({ where: { familyId: family.id } });
  const circuits = await Circuit.findAll({ where: { familyId: family.id }, order: [["id", "ASC"]] });
  const specs = await SpecValue.findAll({ where: { connectorId: g.connectors.map((c) => c.id) } });
  const connById = new Map(g.connectors.map((c) => [c.id, c]));
  const compById = new Map(g.components.map((c) => [c.id, c]));
  const linkById = new Map(g.links.map((l) => [`l${l.id}`, l]));
  const nodes = new Map<string, WalkNode>();
  for (const p of g.pins) {
    const conn = p.connectorId ? connById.get(p.connectorId) : undefined;
    const comp = p.componentId ? compById.get(p.componentId) : undefined;
    nodes.set(String(p.id), {
      id: String(p.id),
      kind: conn ? (conn.componentId ? "component" : "loom") : comp?.kind === "splice" ? "splice" : "terminal",
      connector: conn?.slug ?? null, connectorName: conn?.name ?? null, cavity: p.cavity, code: p.colourCode,
      componentName: comp?.name ?? (conn?.componentId ? compById.get(conn.componentId)?.name ?? null : null),
    });
  }
  const nodeLabel = (id: string) => {
    const n = nodes.get(id)!;
    if (n.kind === "splice") return "a splice in the loom";
    return n.connector ? `${n.connectorName} cavity ${n.cavity}` : `${n.componentName} terminal ${n.cavity}`;
  };
  const describe = (e: GraphEdge): string => {
    if (e.kind === "wire") return `the ${nodes.get(e.a)?.code ?? nodes.get(e.b)?.code ?? ""} wire from ${nodeLabel(e.a)} to ${nodeLabel(e.b)}`.replace("the  wire", "the wire");
    if (e.kind === "mate") {
      const loomSide = [e.a, e.b].map((x) => nodes.get(x)!).find((n) => n.kind === "loom") ?? nodes.get(e.a)!;
      return `the mated terminals at ${loomSide.connectorName}, cavity ${loomSide.cavity} (pushed-back, corroded or spread)`;
    }
    const link = linkById.get(e.id);
    const comp = link ? compById.get(link.componentId) : undefined;
    const name = comp?.name ?? "a component";
    switch (e.kind) {
      case "fuse": return `${name} (blown, or a corroded holder)`;
      case "contact": return `${name}: ${e.label} (worn or dirty contacts)`;
      case "breaker": return `${name}: the points (dirty, or a broken lead)`;
      case "transistor": return `${name}: ${e.label}`;
      default: return `${name}: ${e.label}`;
    }
  };
  const loadSpec = (edge: GraphEdge) => {
    const link = linkById.get(edge.id);
    if (!link) return null;
    const a = g.pins.find((p) => p.id === link.fromPinId);
    const b = g.pins.find((p) => p.id === link.toPinId);
    if (!a?.connectorId || !b?.connectorId || a.connectorId !== b.connectorId) return null;
    const s = specs.find((x) => x.connectorId === a.connectorId && new Set([x.betweenA, x.betweenB]).has(a.cavity) && new Set([x.betweenA, x.betweenB]).has(b.cavity));
    return s && s.max !== null ? { min: s.min, max: s.max, unit: s.unit } : null;
  };
  const compByKey = new Map(g.components.map((c) => [c.key, c]));
  const battery = g.components.find((c) => c.kind === "battery");
  const batteryPlus = battery && g.pins.find((p) => p.componentId === battery.id && p.cavity === "+");
  const circuitDefs = circuits.map((c) => {
    const loads = c.via.map((v) => {
      const dot = v.indexOf(".");
      const comp = compByKey.get(v.slice(0, dot));
      const link = comp && g.links.find((l) => l.componentId === comp.id && l.label === v.slice(dot + 1));
      return g.graph.edges.find((e) => e.id === `l${link?.id}`)!;
    });
    return {
      slug: c.slug, name: c.name, system: systems.find((s) => s.id === c.systemId)?.kind ?? "",
      def: { slug: c.slug, name: c.name, from: String(c.fromPinId), to: String(c.toPinId), loads, powered: c.fromPinId === batteryPlus?.id },
      switches: c.switches,
    };
  });
  const loadKinds = new Map(g.links.map((l) => [`l${l.id}`, compById.get(l.componentId)?.kind ?? "load"]));
  const loadNames = new Map(g.links.map((l) => [`l${l.id}`, compById.get(l.componentId)?.name ?? ""]));
  const fuses = new Map(g.links.filter((l) => l.kind === "fuse").map((l) => [`l${l.id}`, { name: compById.get(l.componentId)?.name ?? "fuse", ratingA: l.ratingA ?? 0 }]));
  return { family, graph: g.graph, nodes, nodeLabel, describe, loadSpec, loadKinds, loadNames, fuses, circuits: circuitDefs };
}

function familyGraph(slug: string) {
  let p = cache.get(slug);
  if (!p) {
    p = load(slug).catch((e) => { cache.delete(slug); throw e; });
    cache.set(slug, p);
  }
  return p;
}

/** The family's circuits, or null for an unknown family. */
export async function listCircuits(familySlug: string) {
  const f = await familyGraph(familySlug);
  if (!f) return null;
  const fam = f.family;
  const layout = /flat twin|boxer|opposed/i.test(fam.engine) ? "flat-twin" : fam.cylinders === 2 ? "parallel-twin" : fam.cylinders === 1 ? "single" : "inline";
  return {
    family: { slug: fam.slug, name: fam.name, make: { slug: fam.make!.slug, name: fam.make!.name }, firingOrder: fam.firingOrder, cylinders: fam.cylinders, crankDeg: fam.crankDeg, engine: fam.engine, ignition: fam.ignition },
    circuits: f.circuits.map((c) => ({ slug: c.slug, name: c.name, system: c.system, powered: c.def.powered, switches: c.switches })),
    wastedSpark: wastedSparkPairs(fam.firingOrder, { cylinders: fam.cylinders, layout, crankDeg: fam.crankDeg }),
  };
}

export type WalkError = { status: 400 | 404; code: "not_found" | "bad_request"; message: string; field?: string };

/** Parse `main:on,kill:run` into switch positions (riding positions for the rest). */
export function parseSwitches(raw: string | null | undefined): { ok: true; value: Record<string, string> } | { ok: false; error: string } {
  const out: Record<string, string> = {};
  for (const part of (raw ?? "").split(",").map((s) => s.trim()).filter(Boolean)) {
    const m = /^([a-z]+):([a-z]+)$/.exec(part);
    if (!m) return { ok: false, error: `"${part}" is not a switch setting; write id:position, e.g. main:on` };
    out[m[1]] = m[2];
  }
  return { ok: true, value: out };
}

/**
 * The probe points of one circuit in the given switch positions. An omitted switch takes its riding position (the
 * API's rule) or, with `fill: "working"`, the position the circuit works in (the page's starting point).
 */
export async function walkFor(familySlug: string, circuitSlug: string, given: Record<string, string>, fill: "riding" | "working" = "riding") {
  const f = await familyGraph(familySlug);
  if (!f) return { ok: false as const, error: { status: 404, code: "not_found", message: `There is no family "${familySlug}" in the library.` } satisfies WalkError };
  const c = f.circuits.find((x) => x.slug === circuitSlug);
  if (!c) return { ok: false as const, error: { status: 404, code: "not_found", message: `The ${f.family.name} has no circuit "${circuitSlug}".` } satisfies WalkError };
  const sw = resolveSwitches(fill === "working" ? { ...c.switches, ...given } : given);
  if (!sw.ok) return { ok: false as const, error: { status: 400, code: "bad_request", message: sw.error, field: "switches" } satisfies WalkError };
  const walk = walkCircuit(f.graph, f.nodes, c.def, sw.value, f.describe, f.loadSpec);
  if (!walk) return { ok: false as const, error: { status: 404, code: "not_found", message: `The ${c.name} circuit does not close in the library's data.` } satisfies WalkError };
  return { ok: true as const, walk, circuit: { slug: c.slug, name: c.name, system: c.system, workingSwitches: c.switches }, family: f.family };
}

/** Locate the fault from the rider's readings. */
export async function diagnoseFor(familySlug: string, circuitSlug: string, switches: Record<string, string>, readings: Reading[], fill: "riding" | "working" = "riding") {
  const w = await walkFor(familySlug, circuitSlug, switches, fill);
  if (!w.ok) return w;
  const steps = new Set(w.walk.probePoints.map((p) => p.step));
  const unknown = readings.find((r) => !steps.has(r.step));
  if (unknown) return { ok: false as const, error: { status: 400, code: "bad_request", message: `There is no probe point ${unknown.step} on this circuit (steps 1–${steps.size}).`, field: "readings" } satisfies WalkError };
  return { ok: true as const, walk: w.walk, diagnosis: diagnose(w.walk, readings) };
}


/** What the loom planner needs of a family: every circuit's wires and load current, and each wire's role. */
export async function plannerData(familySlug: string) {
  const f = await familyGraph(familySlug);
  if (!f) return null;
  const wires = await Wire.findAll({ where: { familyId: f.family.id } });
  const linkComp = new Map<string, { kind: string; label: string }>();
  for (const c of f.circuits) for (const l of c.def.loads) linkComp.set(l.id, { kind: f.loadKinds.get(l.id) ?? "load", label: `${f.loadNames.get(l.id) ?? ""} ${l.label ?? ""}`.trim() });
  const loadCurrent = (kind: string, label: string) => {
    try {
      return nominalLoadA(kind, label);
    } catch (e) {
      // No rule of thumb for this part: say so rather than invent a figure silently.
      if (e instanceof RangeError) return { amps: 1, basis: `${label}: no rule of thumb for a ${kind}, 1 A assumed — enter your own figure` };
      throw e;
    }
  };
  const riding = resolveSwitches({}).ok ? (resolveSwitches({}) as { value: SwitchState }).value : ({} as SwitchState);
  const plus = f.circuits.find((c) => c.def.powered)?.def.from;
  const minus = f.circuits.find((c) => c.def.powered)?.def.to;
  const allOn: SwitchState = { ...riding, main: "on", kill: "run", lights: "on", brake: "pressed", start: "released" };
  const off = plus && minus ? potentials(f.graph, plus, minus, { ...riding, main: "off" }) : null;
  const on = plus && minus ? potentials(f.graph, plus, minus, allOn) : null;
  const circuits = f.circuits.map((c) => {
    const sw = resolveSwitches(c.switches);
    const ids = new Set<string>();
    // Every fuse on the supply path, battery first: the last one is nearest the load.
    const fusesOnPath: { name: string; ratingA: number }[] = [];
    for (const load of c.def.loads) {
      const loop = f.graph.loop(c.def.from, load, c.def.to, sw.ok ? sw.value : riding);
      for (const e of [...(loop?.supply.edges ?? []), ...(loop?.ret.edges ?? [])]) if (e.kind === "wire") ids.add(e.id);
      for (const e of loop?.supply.edges ?? []) {
        const fz = f.fuses.get(e.id);
        if (fz && !fusesOnPath.some((x) => x.name === fz.name)) fusesOnPath.push(fz);
      }
    }
    const fuse = fusesOnPath.at(-1) ?? null;
    const loads = c.def.loads.map((l) => {
      // A load whose card gives its resistance draws I = U / R (Ohm's law) at 12 V; otherwise a rule of thumb.
      const spec = f.loadSpec(l);
      if (spec && spec.unit === "Ω" && spec.min > 0) {
        const r = (spec.min + spec.max) / 2;
        return { amps: 12 / r, basis: `${linkComp.get(l.id)?.label}: 12 V / ${r} Ω (card spec ${spec.min}–${spec.max} Ω) ≈ ${(12 / r).toFixed(1)} A (Ohm's law)` };
      }
      return loadCurrent(linkComp.get(l.id)?.kind ?? "load", linkComp.get(l.id)?.label ?? "");
    });
    return {
      slug: c.slug, name: c.name, system: c.system, wires: [...ids], fuse, fusesOnPath,
      loadA: c.def.powered ? loads.reduce((s, l) => s + l.amps, 0) : 0,
      loadBasis: c.def.powered ? loads.map((l) => l.basis).join("; ") : "signal loop: no load current",
    };
  });
  const signal = new Set(circuits.filter((c) => c.loadA === 0).flatMap((c) => c.wires));
  // "Connector: cavity n" so the planner can tell which wires share a housing.
  const label = (id: number) => {
    const n = f.nodes.get(String(id))!;
    if (n.kind === "splice") return "splice (in the loom)";
    return n.connector ? `${n.connectorName}: cavity ${n.cavity}` : `${n.componentName}: ${n.cavity}`;
  };
  return {
    family: { slug: f.family.slug, name: f.family.name, colourSystem: f.family.colourSystem },
    circuits,
    wires: wires.map((w) => {
      const [a, b] = [String(w.fromPinId), String(w.toPinId)];
      const d = decodeColour(w.colourCode, f.family.colourSystem as ColourSystemId);
      const feed = on && on(a) === "low" && on(b) === "low" ? "earth" as const
        : off && off(a) === "high" ? "battery" as const
        : signal.has(`w${w.id}`) ? "signal" as const
        : on && on(a) === "high" ? "switched" as const : "load" as const;
      return {
        id: `w${w.id}`, from: label(w.fromPinId), to: label(w.toPinId), code: w.colourCode, colours: d.ok ? d.value.colours : [],
        defaultLengthM: w.lengthMm ? w.lengthMm / 1000 : null, factorySizeMm2: w.sizeMm2, earth: feed === "earth", feed,
      };
    }),
  };
}
