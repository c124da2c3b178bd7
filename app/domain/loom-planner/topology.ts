// Where each kept circuit runs in the loom, and which wires share a net.

import { LoomGraph, RIDING_POSITIONS, resolveSwitches } from "../loom-graph";
import type { PlannerInput } from "./types";

// ---------------------------------------------------------------------------------------------
// Topology: each circuit's wires (supply or return side), the fuses and contacts on its supply path, and the nets

export interface Topology {
  /** Per circuit: wires on the supply side (battery first) and on the return side, fuses and contacts on its supply path. */
  circuits: Map<string, { supply: string[]; ret: string[]; fuses: string[]; contacts: string[]; supplyOrder: string[] }>;
  netOf: Map<string, string>;
  earthNets: Set<string>;
  senseNodes: Set<string>;
}

export function topology(input: PlannerInput): Topology {
  const graph = new LoomGraph([...input.network.elements]);
  const byId = new Map(input.network.elements.map((e) => [e.id, e]));
  const circuits: Topology["circuits"] = new Map();
  for (const c of input.circuits) {
    const sw = resolveSwitches(c.switches);
    const state = sw.ok ? sw.value : RIDING_POSITIONS;
    const entry = { supply: [] as string[], ret: [] as string[], fuses: [] as string[], contacts: [] as string[], supplyOrder: [] as string[] };
    for (const id of c.loads) {
      const load = byId.get(id);
      if (!load) continue;
      const loop = graph.loop(c.from, load, c.to, state);
      if (!loop) continue;
      for (const e of loop.supply.edges) {
        if (!entry.supplyOrder.includes(e.id)) entry.supplyOrder.push(e.id);
        if (e.kind === "wire" && !entry.supply.includes(e.id)) entry.supply.push(e.id);
        if (e.kind === "fuse" && !entry.fuses.includes(e.id)) entry.fuses.push(e.id);
        if (e.kind === "contact" && !entry.contacts.includes(e.id)) entry.contacts.push(e.id);
      }
      for (const e of loop.ret.edges) if (e.kind === "wire" && !entry.ret.includes(e.id)) entry.ret.push(e.id);
    }
    circuits.set(c.slug, entry);
  }
  // Nets: pins joined by wires and mated terminals (and so through splices), never through a switch, fuse or load.
  const parent = new Map<string, string>();
  const find = (n: string): string => {
    let r = n;
    while (parent.has(r) && parent.get(r) !== r) r = parent.get(r)!;
    return r;
  };
  const union = (a: string, b: string) => {
    for (const n of [a, b]) if (!parent.has(n)) parent.set(n, n);
    const ra = find(a),
      rb = find(b);
    if (ra !== rb) parent.set(ra, rb);
  };
  for (const e of input.network.elements) if (e.kind === "wire" || e.kind === "mate") union(e.a, e.b);
  const netOf = new Map<string, string>();
  for (const w of input.wires) {
    const e = byId.get(w.id);
    if (e) netOf.set(w.id, find(e.a));
  }
  const earthPost = input.network.earth === "positive" ? input.network.plus : input.network.minus;
  const earthNets = new Set([find(earthPost), ...(input.frameEarth ? [find(input.frameEarth)] : [])]);
  const senseNodes = new Set<string>();
  for (const e of input.network.elements)
    if (e.kind === "sense" || (e.kind === "winding" && /pickup|pulser/i.test(`${e.label ?? ""}`))) {
      senseNodes.add(find(e.a));
      senseNodes.add(find(e.b));
    }
  return { circuits, netOf, earthNets, senseNodes };
}
