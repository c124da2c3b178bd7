import { describe, expect, it } from "vitest";
import { buildFamily } from "../../db/seeders/demo/build";
import { demoMakes } from "../../db/seeders/demo/makes";
import { diagnose, potentials, voltageFor, walkCircuit, BATTERY_V, type WalkCircuit, type WalkNode } from "~/domain/circuit-walk";
import { LoomGraph, RIDING_POSITIONS, resolveSwitches, type EdgeKind, type GraphEdge } from "~/domain/loom-graph";

// The demo families' graphs, built from their specs exactly as the seeder builds them (no database needed).
function familyGraph(spec: (typeof demoMakes)[number]["families"][number]) {
  const rows = buildFamily(spec);
  const owner = new Map(rows.connectors.map((c) => [c.slug, c]));
  const compKind = new Map(rows.components.map((c) => [c.key, c.kind]));
  const nodes = new Map<string, WalkNode>(rows.pins.map((p) => [p.ref, {
    id: p.ref,
    kind: p.connector ? (owner.get(p.connector)!.side === "owner" ? "component" : "loom") : compKind.get(p.component!) === "splice" ? "splice" : "terminal",
    connector: p.connector, connectorName: p.connector ? owner.get(p.connector)!.name : null, cavity: p.cavity, code: p.code, componentName: p.component,
  }]));
  const edges: GraphEdge[] = [
    ...rows.wires.map((w, i) => ({ id: `w${i}`, a: w.from, b: w.to, kind: "wire" as EdgeKind })),
    ...rows.links.map((l) => ({ id: `l:${l.component}.${l.label}`, a: l.from, b: l.to, kind: l.kind as EdgeKind, label: l.label, switchId: l.switchId, positions: l.positions })),
    ...rows.pins.filter((p) => p.ref.includes("~loom:")).map((p) => ({ id: `m:${p.ref}`, a: p.ref, b: p.ref.replace("~loom:", ":"), kind: "mate" as EdgeKind })),
  ];
  const describe = (e: GraphEdge) => e.id; // unique per element, so "the likely list names this element" is exact
  return { rows, nodes, edges, describe };
}

function circuitOf(rows: ReturnType<typeof buildFamily>, edges: GraphEdge[], slug: string): WalkCircuit {
  const c = rows.circuits.find((x) => x.slug === slug)!;
  return { slug, name: c.name, from: c.from, to: c.to, powered: c.from === "battery.+", loads: c.via.map((v) => edges.find((e) => e.id === `l:${v}`)!) };
}

const families = demoMakes.flatMap((m) => m.families);

describe.each(families.map((f) => [f.slug, f] as const))("circuit walk on %s (demo data)", (_slug, spec) => {
  const { rows, nodes, edges, describe: desc } = familyGraph(spec);
  const graph = new LoomGraph(edges);
  const noSpec = () => null;

  it("walks every circuit, and every probe point is a real cavity or terminal", () => {
    for (const c of rows.circuits) {
      const sw = resolveSwitches(c.switches);
      expect(sw.ok).toBe(true);
      const walk = walkCircuit(graph, nodes, circuitOf(rows, edges, c.slug), sw.ok ? sw.value : RIDING_POSITIONS, desc, noSpec);
      expect(walk, c.slug).not.toBeNull();
      expect(walk!.probePoints.length).toBeGreaterThan(1);
      for (const p of walk!.probePoints) {
        const n = nodes.get(p.node)!;
        expect(["loom", "terminal"]).toContain(n.kind);
        if (p.connector) expect(rows.connectors.find((x) => x.slug === p.connector)!.cavities.some((x) => x.cavity === p.cavity)).toBe(true);
      }
    }
  });

  it("expects battery voltage up to the load and 0 V after it in working positions, and follows the switches", () => {
    const ign = circuitOf(rows, edges, "ignition");
    const on = walkCircuit(graph, nodes, ign, { ...RIDING_POSITIONS, main: "on", kill: "run" }, desc, noSpec)!;
    for (const p of on.probePoints) {
      // Kirchhoff's voltage law with no current through the meter: the supply side sits at battery voltage, the return side at 0 V.
      if (p.node === "battery.-") continue;
      expect(p.expect.min, `${p.label} (${p.side})`).toBe(p.side === "supply" ? 11.5 : 0);
    }
    const killed = walkCircuit(graph, nodes, ign, { ...RIDING_POSITIONS, kill: "stop" }, desc, noSpec)!;
    const killPoint = killed.probePoints.findIndex((p) => p.elementsBefore.some((e) => /kill/.test(e)));
    expect(killPoint).toBeGreaterThan(0);
    // Beyond an open kill switch nothing is fed: those points read near 0 V; before it, battery voltage.
    expect(killed.probePoints[killPoint].expect.max).toBe(0.5);
    expect(killed.probePoints[killPoint - 1].expect.min).toBe(11.5);
    const off = walkCircuit(graph, nodes, ign, { ...RIDING_POSITIONS, main: "off" }, desc, noSpec)!;
    expect(off.probePoints.filter((p) => p.expect.min === 11.5).length).toBeLessThan(on.probePoints.filter((p) => p.expect.min === 11.5).length);
  });

  it("locates a fault injected at each element of the ignition circuit between the right two probe points", () => {
    const ign = circuitOf(rows, edges, "ignition");
    const sw = { ...RIDING_POSITIONS, main: "on", kill: "run" };
    const walk = walkCircuit(graph, nodes, ign, sw, desc, noSpec)!;
    const elements = new Set(walk.probePoints.flatMap((p) => p.elementsBefore));
    expect(elements.size).toBeGreaterThan(10);
    for (const id of elements) {
      // Open the element (cut the wire, blow the fuse, burn the contact …) and take the readings a meter would show.
      const faulted = new LoomGraph(edges.filter((e) => e.id !== id));
      const pot = potentials(faulted, ign.from, ign.to, sw);
      const readings = walk.probePoints.map((p) => ({ step: p.step, value: voltageFor(pot(p.node)) }));
      const d = diagnose(walk, readings);
      expect(d.fault, `open ${id}`).not.toBeNull();
      expect(d.fault!.likely, `open ${id} → between ${d.fault!.between}`).toContain(id);
      const [a, b] = d.fault!.between;
      expect(a).toBeLessThanOrEqual(b);
    }
  });

  it("with no readings suggests the middle point, and halves the interval as readings come in", () => {
    const ign = circuitOf(rows, edges, "ignition");
    const walk = walkCircuit(graph, nodes, ign, RIDING_POSITIONS, desc, noSpec)!;
    const n = walk.probePoints.length;
    const first = diagnose(walk, []);
    expect(first.fault).toBeNull();
    expect(Math.abs(first.next! - (n + 1) / 2)).toBeLessThanOrEqual(1);
    const good = walk.probePoints.filter((p) => p.step <= first.next!).map((p) => ({ step: p.step, value: p.expect.min === 0 ? 0 : BATTERY_V }));
    const second = diagnose(walk, good);
    expect(second.next === null || second.next > first.next!).toBe(true);
  });
});

describe("passive loops (ohmmeter, ignition off)", () => {
  it("locates a cut pickup wire on the transistor four", () => {
    const spec = families.find((f) => f.slug === "rx750-four")!;
    const { rows, nodes, edges, describe: desc } = familyGraph(spec);
    const graph = new LoomGraph(edges);
    const pick = circuitOf(rows, edges, "pickup-1");
    const walk = walkCircuit(graph, nodes, pick, RIDING_POSITIONS, desc, () => ({ min: 420, max: 580, unit: "Ω" }))!;
    expect(walk.probePoints[0].expect.quantity).toBe("continuity");
    expect(walk.probePoints.at(-1)!.expect).toMatchObject({ quantity: "resistance", min: 420 });
    // Cut the wire on the return side: the far end reads open (a very high value), the near side the winding.
    const returnWire = walk.probePoints.at(-1)!.elementsBefore.find((e) => e.startsWith("w"))!;
    const readings = walk.probePoints.map((p, i) => ({ step: p.step, value: i === walk.probePoints.length - 1 ? 1e9 : i === 0 ? 0 : p.expect.quantity === "resistance" ? 500 : 0.2 }));
    const d = diagnose(walk, readings);
    expect(d.fault!.likely).toContain(returnWire);
  });
});
