import { describe, expect, it } from "vitest";
import { LoomGraph, RIDING_POSITIONS, conducts, resolveSwitches, type GraphEdge } from "~/domain/loom-graph";

// A minimal series circuit: battery + → fuse → main switch → kill switch → coil primary → points → earth → battery −.
// Kirchhoff's voltage law (any physics text): current flows only round a closed loop, so opening any series
// element opens the circuit; a load is crossed only as the circuit's own load.
const edges: GraphEdge[] = [
  { id: "w1", a: "batt+", b: "fuse.in", kind: "wire" },
  { id: "f", a: "fuse.in", b: "fuse.out", kind: "fuse" },
  { id: "w2", a: "fuse.out", b: "main.1", kind: "wire" },
  { id: "main", a: "main.1", b: "main.2", kind: "contact", switchId: "main", positions: ["on"] },
  { id: "m1", a: "main.2", b: "kill.1", kind: "mate" },
  { id: "kill", a: "kill.1", b: "kill.2", kind: "contact", switchId: "kill", positions: ["run"] },
  { id: "w3", a: "kill.2", b: "coil+", kind: "wire" },
  { id: "primary", a: "coil+", b: "coil-", kind: "winding", label: "primary" },
  { id: "w4", a: "coil-", b: "points.1", kind: "wire" },
  { id: "points", a: "points.1", b: "earth", kind: "breaker" },
  { id: "w5", a: "earth", b: "batt-", kind: "wire" },
  { id: "cells", a: "batt+", b: "batt-", kind: "source" },
  // A lamp from the switched feed to earth: a parallel load the ignition loop must not borrow.
  { id: "lamp", a: "main.2", b: "earth", kind: "lamp" },
];
const g = new LoomGraph(edges);
const primary = edges.find((e) => e.id === "primary")!;

describe("loom graph", () => {
  it("closes the ignition loop in riding positions", () => {
    const loop = g.loop("batt+", primary, "batt-", RIDING_POSITIONS);
    expect(loop).not.toBeNull();
    expect(loop!.supply.edges.map((e) => e.id)).toEqual(["w1", "f", "w2", "main", "m1", "kill", "w3"]);
    expect(loop!.ret.edges.map((e) => e.id)).toEqual(["w4", "points", "w5"]);
  });

  it("opens when any series switch is open (main off, kill stop)", () => {
    expect(g.loop("batt+", primary, "batt-", { ...RIDING_POSITIONS, main: "off" })).toBeNull();
    expect(g.loop("batt+", primary, "batt-", { ...RIDING_POSITIONS, kill: "stop" })).toBeNull();
  });

  it("opens when a wire is cut, and never closes through another load or the battery itself", () => {
    const cut = new LoomGraph(edges.filter((e) => e.id !== "w4"));
    expect(cut.loop("batt+", primary, "batt-", RIDING_POSITIONS)).toBeNull();
    // Without w4 the only way from coil− to earth would be back through the lamp: not allowed.
    expect(cut.path("coil-", "batt-", RIDING_POSITIONS)).toBeNull();
    // Nor from + to − without a load: a conductor-only path there would be a dead short (Ohm: I = V/R, R ≈ 0).
    expect(g.path("batt+", "batt-", RIDING_POSITIONS)).toBeNull();
    const shorted = new LoomGraph([...edges, { id: "chafe", a: "main.2", b: "earth", kind: "wire" }]);
    expect(shorted.path("batt+", "batt-", RIDING_POSITIONS)!.edges.map((e) => e.id)).toContain("chafe");
  });

  it("takes a contact's positions literally", () => {
    const main = edges.find((e) => e.id === "main")!;
    expect(conducts(main, { ...RIDING_POSITIONS, main: "on" })).toBe(true);
    expect(conducts(main, { ...RIDING_POSITIONS, main: "park" })).toBe(false);
    expect(conducts(primary, RIDING_POSITIONS)).toBe(false);
  });

  it("resolves partial switch settings against the riding positions (API.md: omitted switch = riding position)", () => {
    expect(resolveSwitches({})).toEqual({ ok: true, value: RIDING_POSITIONS });
    expect(resolveSwitches({ kill: "stop" })).toEqual({ ok: true, value: { ...RIDING_POSITIONS, kill: "stop" } });
    const badId = resolveSwitches({ choke: "on" });
    expect(badId.ok).toBe(false);
    const badPos = resolveSwitches({ main: "sideways" });
    expect(!badPos.ok && badPos.error).toContain("sideways");
  });
});
