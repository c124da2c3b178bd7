/**
 * The loom as a graph: pins are nodes; wires, mated cavities and components' internal links are edges.
 * Pure functions, shared by the consistency check and the circuit walk.
 */

/**
 * The switches every family shares, and the engine's own state: a contact may name "engine" (an oil-pressure switch is
 * closed while the engine is stopped) and the contact breakers follow "points" while the engine is stopped.
 */
export const SWITCH_POSITIONS = {
  main: ["off", "on", "park"],
  kill: ["run", "stop"],
  start: ["released", "pressed"],
  lights: ["off", "on"],
  brake: ["released", "pressed"],
  beam: ["low", "high"],
  indicators: ["off", "left", "right"],
  horn: ["released", "pressed"],
  gear: ["neutral", "in-gear"],
  engine: ["stopped", "cranking", "running"],
  points: ["closed", "open"],
} as const;
export type SwitchId = keyof typeof SWITCH_POSITIONS;
export type SwitchState = Record<SwitchId, string>;

/** What an omitted switch is taken to be: the riding positions (main on, kill run), the engine stopped, in neutral. */
export const RIDING_POSITIONS: SwitchState = {
  main: "on",
  kill: "run",
  start: "released",
  lights: "off",
  brake: "released",
  beam: "low",
  indicators: "off",
  horn: "released",
  gear: "neutral",
  engine: "stopped",
  points: "closed",
};

export type EdgeKind = "wire" | "mate" | "contact" | "fuse" | "transistor" | "breaker" | "winding" | "load" | "lamp" | "sense" | "source";
/** Edges a current passes without doing work in them; the rest are loads (or the battery itself). */
const CONDUCTORS: ReadonlySet<EdgeKind> = new Set(["wire", "mate", "contact", "fuse", "transistor", "breaker"]);

export interface GraphEdge {
  id: string;
  a: string;
  b: string;
  kind: EdgeKind;
  label?: string;
  switchId?: string | null;
  positions?: string[] | null;
}

/** Whether an edge conducts with the switches where they are. */
export function conducts(e: GraphEdge, switches: SwitchState): boolean {
  if (!CONDUCTORS.has(e.kind)) return false;
  if (e.switchId && e.positions) return e.positions.includes(switches[e.switchId as SwitchId]);
  return true;
}

/** Resolve a partial switch setting against the riding positions; returns an error for unknown ids or positions. */
export function resolveSwitches(partial: Record<string, string>): { ok: true; value: SwitchState } | { ok: false; error: string } {
  const value = { ...RIDING_POSITIONS };
  for (const [id, pos] of Object.entries(partial)) {
    // Own keys only: "constructor" or "__proto__" must not find Object.prototype's members.
    const allowed = Object.hasOwn(SWITCH_POSITIONS, id) ? (SWITCH_POSITIONS[id as SwitchId] as readonly string[]) : undefined;
    if (!allowed) return { ok: false, error: `"${id}" is not a switch; use one of ${Object.keys(SWITCH_POSITIONS).join(", ")}` };
    if (!allowed.includes(pos)) return { ok: false, error: `"${pos}" is not a position of the ${id} switch; use ${allowed.join(" or ")}` };
    value[id as SwitchId] = pos;
  }
  return { ok: true, value };
}

/** An adjacency index over edges. */
export class LoomGraph {
  private adj = new Map<string, GraphEdge[]>();
  constructor(readonly edges: GraphEdge[]) {
    for (const e of edges) {
      for (const n of [e.a, e.b]) {
        let list = this.adj.get(n);
        if (!list) this.adj.set(n, (list = []));
        list.push(e);
      }
    }
  }

  /** Whether an edge conducts with the switches where they are (see `conducts`). */
  conductsEdge(e: GraphEdge, switches: SwitchState): boolean {
    return conducts(e, switches);
  }

  /** Edges touching a node. */
  at(node: string): GraphEdge[] {
    return this.adj.get(node) ?? [];
  }

  /** Shortest path (fewest edges) from one node to another through conducting edges only; null when open. */
  path(from: string, to: string, switches: SwitchState): { nodes: string[]; edges: GraphEdge[] } | null {
    if (from === to) return { nodes: [from], edges: [] };
    const prev = new Map<string, { node: string; edge: GraphEdge }>();
    const seen = new Set([from]);
    const queue = [from];
    for (let i = 0; i < queue.length; i++) {
      const node = queue[i]!; // i < queue.length
      for (const e of this.at(node)) {
        if (!conducts(e, switches)) continue;
        const next = e.a === node ? e.b : e.a;
        if (seen.has(next)) continue;
        seen.add(next);
        prev.set(next, { node, edge: e });
        if (next === to) {
          const nodes = [to];
          const edges: GraphEdge[] = [];
          for (let n = to; n !== from;) {
            const p = prev.get(n)!;
            edges.unshift(p.edge);
            nodes.unshift(p.node);
            n = p.node;
          }
          return { nodes, edges };
        }
        queue.push(next);
      }
    }
    return null;
  }

  /**
   * A closed circuit from `from` through the load edge `via` to `to` (either way round), or null.
   * Current passes conductors freely but no other load: a series circuit must close through its own load.
   */
  loop(from: string, via: GraphEdge, to: string, switches: SwitchState) {
    for (const [x, y] of [
      [via.a, via.b],
      [via.b, via.a],
    ] as const) {
      const supply = this.path(from, x, switches);
      const ret = supply && this.path(y, to, switches);
      if (supply && ret) return { supply, load: via, ret };
    }
    return null;
  }
}
