/** Circuits of a family: the walk (probe points and expectations) and the diagnosis, from the stored loom graph. */
import { Circuit, Family, Make, SpecValue, System } from "~db/models/index.ts";
import { familyNetwork, loadFamilyGraph } from "~db/graph.ts";
import { diagnose, walkCircuit, type Reading, type WalkNode } from "~/domain/circuit-walk";
import { decodeColour, houseFor, type ColourSystemId } from "~/domain/colours";
import { ENGINE_STATES, type EngineState } from "~/domain/electrics";
import type { PlannerInput } from "~/domain/loom-planner";
import { resolveSwitches, type GraphEdge } from "~/domain/loom-graph";
import { wastedSparkPairs } from "~/domain/wasted-spark";
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
      connector: conn?.slug ?? null,
      connectorName: conn?.name ?? null,
      cavity: p.cavity,
      code: p.colourCode,
      componentName: comp?.name ?? (conn?.componentId ? (compById.get(conn.componentId)?.name ?? null) : null),
    });
  }
  const nodeLabel = (id: string) => {
    const n = nodes.get(id)!;
    if (n.kind === "splice") return "a splice in the loom";
    return n.connector ? `${n.connectorName} cavity ${n.cavity}` : `${n.componentName} terminal ${n.cavity}`;
  };
  const describe = (e: GraphEdge): string => {
    if (e.kind === "wire")
      return `the ${nodes.get(e.a)?.code ?? nodes.get(e.b)?.code ?? ""} wire from ${nodeLabel(e.a)} to ${nodeLabel(e.b)}`.replace("the  wire", "the wire");
    if (e.kind === "mate") {
      const loomSide = [e.a, e.b].map((x) => nodes.get(x)!).find((n) => n.kind === "loom") ?? nodes.get(e.a)!;
      return `the mated terminals at ${loomSide.connectorName}, cavity ${loomSide.cavity} (pushed-back, corroded or spread)`;
    }
    const link = linkById.get(e.id);
    const comp = link ? compById.get(link.componentId) : undefined;
    const name = comp?.name ?? "a component";
    switch (e.kind) {
      case "fuse":
        return `${name} (blown, or a corroded holder)`;
      case "contact":
        return `${name}: ${e.label} (worn or dirty contacts)`;
      case "breaker":
        return `${name}: the points (dirty, or a broken lead)`;
      case "transistor":
        return `${name}: ${e.label}`;
      default:
        return `${name}: ${e.label}`;
    }
  };
  const loadSpec = (edge: GraphEdge) => {
    const link = linkById.get(edge.id);
    if (!link) return null;
    const a = g.pins.find((p) => p.id === link.fromPinId);
    const b = g.pins.find((p) => p.id === link.toPinId);
    if (!a?.connectorId || !b?.connectorId || a.connectorId !== b.connectorId) return null;
    const s = specs.find(
      (x) => x.connectorId === a.connectorId && new Set([x.betweenA, x.betweenB]).has(a.cavity) && new Set([x.betweenA, x.betweenB]).has(b.cavity),
    );
    return s && s.max !== null ? { min: s.min, max: s.max, unit: s.unit } : null;
  };
  const compByKey = new Map(g.components.map((c) => [c.key, c]));
  const battery = g.components.find((c) => c.kind === "battery");
  const batteryPosts = new Set(battery ? g.pins.filter((p) => p.componentId === battery.id).map((p) => p.id) : []);
  const circuitDefs = circuits.map((c) => {
    const loads = c.via.map((v) => {
      const dot = v.indexOf(".");
      const comp = compByKey.get(v.slice(0, dot));
      const link = comp && g.links.find((l) => l.componentId === comp.id && l.label === v.slice(dot + 1));
      return g.graph.edges.find((e) => e.id === `l${link?.id}`)!;
    });
    return {
      slug: c.slug,
      name: c.name,
      system: systems.find((s) => s.id === c.systemId)?.kind ?? "",
      def: { slug: c.slug, name: c.name, from: String(c.fromPinId), to: String(c.toPinId), loads, powered: batteryPosts.has(c.fromPinId) },
      switches: c.switches,
    };
  });
  // The regulated-voltage spec of the family (the walk's window while charging), if a card gives one.
  const reg = specs.find((x) => x.kind === "regulated-voltage" && x.max !== null);
  const network = familyNetwork(g, family, reg ? { min: reg.min, max: reg.max! } : null);
  const fittings = new Map<string, string | null>();
  for (const p of g.pins) {
    const conn = p.connectorId ? connById.get(p.connectorId) : undefined;
    const comp = p.componentId ? compById.get(p.componentId) : undefined;
    fittings.set(String(p.id), conn ? conn.housing.replace(/^\d+-way\s*/, "") : comp?.kind === "splice" ? "splice" : (p.fitting ?? null));
  }
  // A fuse is named by its holder (the cut list names its ends "<holder>: in"); other links by component and contact.
  const elementNames = new Map(
    g.links.map((l) => [
      `l${l.id}`,
      l.kind === "fuse" ? (compById.get(l.componentId)?.name ?? "fuse") : `${compById.get(l.componentId)?.name ?? "component"}: ${l.label}`,
    ]),
  );
  const frame = g.components.find((c) => c.kind === "frame-earth");
  const frameEarth = frame ? String(g.pins.find((p) => p.componentId === frame.id)?.id ?? "") || null : null;
  const hasPoints = g.links.some((l) => l.kind === "breaker");
  const hasStarter = g.components.some((c) => c.kind === "starter-motor");
  return {
    family,
    graph: g.graph,
    nodes,
    nodeLabel,
    describe,
    loadSpec,
    circuits: circuitDefs,
    network,
    fittings,
    elementNames,
    frameEarth,
    wires: g.wires,
    hasPoints,
    hasStarter,
  };
}

function familyGraph(slug: string) {
  let p = cache.get(slug);
  if (!p) {
    p = load(slug).catch((e) => {
      cache.delete(slug);
      throw e;
    });
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
    family: {
      slug: fam.slug,
      name: fam.name,
      make: { slug: fam.make!.slug, name: fam.make!.name },
      firingOrder: fam.firingOrder,
      cylinders: fam.cylinders,
      crankDeg: fam.crankDeg,
      engine: fam.engine,
      ignition: fam.ignition,
      systemVoltage: fam.systemVoltage,
      earth: fam.earth,
      points: f.hasPoints,
      electricStart: f.hasStarter,
    },
    circuits: f.circuits.map((c) => ({ slug: c.slug, name: c.name, system: c.system, powered: c.def.powered, switches: c.switches })),
    wastedSpark: wastedSparkPairs(fam.firingOrder, { cylinders: fam.cylinders, layout, crankDeg: fam.crankDeg }),
  };
}

export type WalkError = { status: 400 | 404; code: "not_found" | "bad_request"; message: string; field?: string };

/** Parse `main:on,kill:run` into switch positions (riding positions for the rest). */
export function parseSwitches(raw: string | null | undefined): { ok: true; value: Record<string, string> } | { ok: false; error: string } {
  const out: Record<string, string> = {};
  for (const part of (raw ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean)) {
    const m = /^([a-z]+):([a-z]+)$/.exec(part);
    if (!m) return { ok: false, error: `"${part}" is not a switch setting; write id:position, e.g. main:on` };
    out[m[1]] = m[2];
  }
  return { ok: true, value: out };
}

/** The engine's state and the points for a walk: `engine` stopped|cranking|running, `points` open|closed (contact-breaker ignitions). */
export interface WalkState {
  engine?: string | null;
  points?: string | null;
}

/**
 * The probe points of one circuit in the given state. An omitted switch takes its riding position and the engine is
 * stopped (the API's rule) or, with `fill: "working"`, the position the circuit works in (the page's starting point).
 */
export async function walkFor(
  familySlug: string,
  circuitSlug: string,
  given: Record<string, string>,
  fill: "riding" | "working" = "riding",
  state: WalkState = {},
) {
  const f = await familyGraph(familySlug);
  if (!f)
    return { ok: false as const, error: { status: 404, code: "not_found", message: `There is no family "${familySlug}" in the library.` } satisfies WalkError };
  const c = f.circuits.find((x) => x.slug === circuitSlug);
  if (!c)
    return {
      ok: false as const,
      error: { status: 404, code: "not_found", message: `The ${f.family.name} has no circuit "${circuitSlug}".` } satisfies WalkError,
    };
  const notes: string[] = [];
  const wanted: Record<string, string> = { ...(fill === "working" ? c.switches : {}), ...given };
  if (state.engine !== undefined && state.engine !== null && state.engine !== "") {
    if (!(ENGINE_STATES as readonly string[]).includes(state.engine))
      return {
        ok: false as const,
        error: {
          status: 400,
          code: "bad_request",
          message: `"${state.engine}" is not an engine state; use ${ENGINE_STATES.join(", ")}`,
          field: "engine",
        } satisfies WalkError,
      };
    wanted.engine = state.engine;
  }
  if (state.points !== undefined && state.points !== null && state.points !== "") {
    if (state.points !== "open" && state.points !== "closed")
      return {
        ok: false as const,
        error: {
          status: 400,
          code: "bad_request",
          message: `"${state.points}" is not a position of the points; use open or closed`,
          field: "points",
        } satisfies WalkError,
      };
    if (f.hasPoints) wanted.points = state.points;
    else notes.push(`The ${f.family.name} has no contact breakers: "points" was ignored.`);
  }
  // The start button and cranking go together on an electric-start bike: pressing it turns the engine.
  if (f.hasStarter && wanted.engine === "cranking" && wanted.start === undefined) wanted.start = "pressed";
  if (f.hasStarter && wanted.start === "pressed" && (wanted.engine ?? "stopped") === "stopped") {
    wanted.engine = "cranking";
    notes.push("The start button turns the engine: taken as cranking.");
  }
  if (!f.hasStarter && wanted.engine === "cranking") notes.push("Kick start: the battery sees no starter load while the engine is kicked over.");
  const sw = resolveSwitches(wanted);
  if (!sw.ok) return { ok: false as const, error: { status: 400, code: "bad_request", message: sw.error, field: "switches" } satisfies WalkError };
  const walk = walkCircuit(f.graph, f.nodes, c.def, sw.value, c.def.powered ? f.network : null, f.describe, f.loadSpec);
  if (!walk)
    return {
      ok: false as const,
      error: { status: 404, code: "not_found", message: `The ${c.name} circuit does not close in the library's data.` } satisfies WalkError,
    };
  walk.notes.unshift(...notes);
  return {
    ok: true as const,
    walk,
    circuit: { slug: c.slug, name: c.name, system: c.system, workingSwitches: c.switches },
    family: f.family,
    state: { engine: sw.value.engine as EngineState, points: f.hasPoints ? sw.value.points : null },
    hasPoints: f.hasPoints,
    hasStarter: f.hasStarter,
  };
}

/** Locate the fault from the rider's readings. */
export async function diagnoseFor(
  familySlug: string,
  circuitSlug: string,
  switches: Record<string, string>,
  readings: Reading[],
  fill: "riding" | "working" = "riding",
  state: WalkState = {},
) {
  const w = await walkFor(familySlug, circuitSlug, switches, fill, state);
  if (!w.ok) return w;
  const steps = new Set(w.walk.probePoints.map((p) => p.step));
  const unknown = readings.find((r) => !steps.has(r.step));
  if (unknown)
    return {
      ok: false as const,
      error: {
        status: 400,
        code: "bad_request",
        message: `There is no probe point ${unknown.step} on this circuit (steps 1–${steps.size}).`,
        field: "readings",
      } satisfies WalkError,
    };
  return { ok: true as const, walk: w.walk, state: w.state, diagnosis: diagnose(w.walk, readings) };
}

/** What the loom planner needs of a family: its network, circuits, wires (with their end fittings) and element names. */
export async function plannerData(familySlug: string) {
  const f = await familyGraph(familySlug);
  if (!f) return null;
  const label = (id: number) => {
    const n = f.nodes.get(String(id))!;
    if (n.kind === "splice") return "splice (in the loom)";
    return n.connector ? `${n.connectorName}: cavity ${n.cavity}` : `${n.componentName}: ${n.cavity}`;
  };
  const fitting = (id: number) => f.fittings.get(String(id)) ?? null;
  const input: Omit<PlannerInput, "keep" | "scheme" | "notation" | "lengthsM" | "tempC"> | null = f.network
    ? {
        network: f.network,
        circuits: f.circuits.map((c) => ({
          slug: c.slug,
          name: c.name,
          system: c.system,
          from: c.def.from,
          to: c.def.to,
          loads: c.def.loads.map((l) => l.id),
          switches: c.switches,
        })),
        wires: f.wires.map((w) => {
          const d = decodeColour(w.colourCode, f.family.colourSystem as ColourSystemId, {
            houseStyle: houseFor(f.family.colourSystem, f.family.make?.houseStyle),
          });
          return {
            id: `w${w.id}`,
            from: label(w.fromPinId),
            to: label(w.toPinId),
            fromFitting: fitting(w.fromPinId),
            toFitting: fitting(w.toPinId),
            code: w.colourCode,
            colours: d.ok ? d.value.colours : [],
            defaultLengthM: w.lengthMm ? w.lengthMm / 1000 : null,
            factorySizeMm2: w.sizeMm2,
          };
        }),
        names: Object.fromEntries([...f.elementNames]),
        frameEarth: f.frameEarth,
      }
    : null;
  return {
    family: {
      slug: f.family.slug,
      name: f.family.name,
      colourSystem: f.family.colourSystem,
      yearFrom: f.family.yearFrom,
      yearTo: f.family.yearTo,
      systemVoltage: f.family.systemVoltage,
    },
    circuits: f.circuits,
    input,
  };
}
