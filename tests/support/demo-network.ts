/** The demo families' loom graphs and networks, built from their specs exactly as the seeder builds them (no database). */
import { buildFamily } from "../../db/seeders/demo/build";
import { demoMakes } from "../../db/seeders/demo/makes";
import type { WalkCircuit, WalkNode } from "~/domain/circuit-walk";
import type { Element, Network } from "~/domain/electrics";
import { LoomGraph, type EdgeKind } from "~/domain/loom-graph";
import { strandedResistance } from "~/domain/wire-size";

export const demoFamilies = demoMakes.flatMap((m) => m.families.map((f) => ({ ...f, make: m })));
export type DemoFamily = (typeof demoFamilies)[number];

/** Everything a unit test needs of one demo family: rows, walk nodes, network, graph. */
export function demoNetwork(f: DemoFamily) {
  const rows = buildFamily(f);
  const owner = new Map(rows.connectors.map((c) => [c.slug, c]));
  const compKind = new Map(rows.components.map((c) => [c.key, c.kind]));
  const compName = new Map(rows.components.map((c) => [c.key, c.name]));
  const nodes = new Map<string, WalkNode>(
    rows.pins.map((p) => [
      p.ref,
      {
        id: p.ref,
        kind: p.connector ? (owner.get(p.connector)!.side === "owner" ? "component" : "loom") : compKind.get(p.component!) === "splice" ? "splice" : "terminal",
        connector: p.connector,
        connectorName: p.connector ? owner.get(p.connector)!.name : null,
        cavity: p.cavity,
        code: p.code,
        componentName: p.component ? (compName.get(p.component) ?? p.component) : null,
      },
    ]),
  );
  const elements: Element[] = [
    ...rows.wires.map((w, i) => ({
      id: `w${i}`,
      a: w.from,
      b: w.to,
      kind: "wire" as EdgeKind,
      ohms: strandedResistance(w.sizeMm2 ?? 0.75, (w.lengthMm ?? 1000) / 1000),
    })),
    ...rows.links.map((l) => ({
      id: `l:${l.component}.${l.label}`,
      a: l.from,
      b: l.to,
      kind: l.kind as EdgeKind,
      label: l.label,
      switchId: l.switchId,
      positions: l.positions,
      params: l.params,
      ratingA: l.ratingA,
    })),
    ...rows.pins
      .filter((p) => p.ref.includes("~loom:"))
      .map((p) => ({ id: `m:${p.ref}`, a: p.ref, b: p.ref.replace("~loom:", ":"), kind: "mate" as EdgeKind })),
  ];
  const regulated = rows.specs.find((s) => s.kind === "regulated-voltage");
  const net: Network = {
    elements,
    systemV: f.systemVoltage,
    earth: f.earth,
    plus: "battery.+",
    minus: "battery.-",
    regulated: regulated && regulated.max !== null ? { min: regulated.min, max: regulated.max } : null,
  };
  const graph = new LoomGraph(elements);
  const circuit = (slug: string): WalkCircuit => {
    const c = rows.circuits.find((x) => x.slug === slug)!;
    return {
      slug,
      name: c.name,
      from: c.from,
      to: c.to,
      powered: c.from.startsWith("battery."),
      loads: c.via.map((v) => elements.find((e) => e.id === `l:${v}`)!),
    };
  };
  return { rows, nodes, net, graph, circuit, elements };
}

/** The loom planner's input for a demo family, as the planner service builds it from the database. */
export function demoPlannerInput(f: DemoFamily, keep?: string[], scheme: "factory" | "simple" = "factory"): import("~/domain/loom-planner").PlannerInput {
  const d = demoNetwork(f);
  const pinOf = new Map(d.rows.pins.map((p) => [p.ref, p]));
  const housing = new Map(d.rows.connectors.map((c) => [c.slug, c.housing]));
  const compKind = new Map(d.rows.components.map((c) => [c.key, c.kind]));
  const fitting = (ref: string) => {
    const p = pinOf.get(ref)!;
    if (p.connector) return housing.get(p.connector)!.replace(/^\d+-way\s*/, "");
    if (p.component && compKind.get(p.component) === "splice") return "splice";
    return p.fitting ?? null;
  };
  const label = (ref: string) => {
    const n = d.nodes.get(ref)!;
    return n.connector ? `${n.connectorName}: cavity ${n.cavity}` : `${n.componentName}: ${n.cavity}`;
  };
  const names: Record<string, string> = {};
  for (const l of d.rows.links) {
    const comp = d.rows.components.find((c) => c.key === l.component)!.name;
    names[`l:${l.component}.${l.label}`] = l.kind === "fuse" ? comp : `${comp}: ${l.label}`;
  }
  return {
    network: d.net,
    circuits: d.rows.circuits.map((c) => ({
      slug: c.slug,
      name: c.name,
      system: c.system,
      from: c.from,
      to: c.to,
      loads: c.via.map((v) => `l:${v}`),
      switches: c.switches as Record<string, string>,
    })),
    wires: d.rows.wires.map((w, i) => ({
      id: `w${i}`,
      from: label(w.from),
      to: label(w.to),
      fromFitting: fitting(w.from),
      toFitting: fitting(w.to),
      code: w.code,
      colours: [],
      defaultLengthM: w.lengthMm ? w.lengthMm / 1000 : null,
      factorySizeMm2: w.sizeMm2,
    })),
    names,
    frameEarth: "frame-earth.E",
    keep: keep ?? d.rows.circuits.map((c) => c.slug),
    scheme,
    notation: f.make.colourSystem,
  };
}
