// One nodal solve with every element's behaviour fixed: merge conductor-joined pins, solve the loads, then the conductors.

import type { Behaviour } from "./behaviour";
import type { Element, Network } from "./network";

const GMIN = 1e-9; // S, from every node to the reference: floating nodes settle instead of making the matrix singular (as in SPICE)

interface TopologySolution {
  V: Map<string, number>;
  I: Map<string, number>;
  ac: Map<string, number>;
  via: Map<string, "live" | "earth" | "load" | "none">;
}

/** One solve with every element's behaviour fixed (no switching left). */
export function solveTopology(elements: readonly { e: Element; b: Behaviour }[], net: Network): TopologySolution {
  // 1. Merge pins joined by conductors.
  const parent = new Map<string, string>();
  const find = (n: string): string => {
    let r = n;
    for (let p = parent.get(r); p !== undefined && p !== r; p = parent.get(r)) r = p;
    for (let y = n, p = parent.get(y); p !== undefined && p !== r; y = p, p = parent.get(y)) parent.set(y, r);
    return r;
  };
  const touch = (n: string) => {
    if (!parent.has(n)) parent.set(n, n);
  };
  for (const { e } of elements) {
    touch(e.a);
    touch(e.b);
  }
  touch(net.plus);
  touch(net.minus);
  for (const { e, b } of elements)
    if (b.t === "conductor") {
      const ra = find(e.a),
        rb = find(e.b);
      if (ra !== rb) parent.set(ra, rb);
    }

  const ref = find(net.minus);
  const supers: string[] = [];
  const index = new Map<string, number>();
  for (const n of parent.keys()) {
    const r = find(n);
    if (r !== ref && !index.has(r)) {
      index.set(r, supers.length);
      supers.push(r);
    }
  }
  const sources = elements.filter(({ b }) => b.t === "voltage");
  const size = supers.length + sources.length;
  const A = new Float64Array(size * size);
  const z = new Float64Array(size);
  const at = (r: string) => (r === ref ? -1 : index.get(r)!);
  const stampG = (a: number, b: number, g: number) => {
    if (a >= 0) A[a * size + a] += g;
    if (b >= 0) A[b * size + b] += g;
    if (a >= 0 && b >= 0) {
      A[a * size + b] -= g;
      A[b * size + a] -= g;
    }
  };
  for (let i = 0; i < supers.length; i++) A[i * size + i] += GMIN;
  for (const { e, b } of elements) {
    const sa = at(find(e.a)),
      sb = at(find(e.b));
    if (b.t === "resistor" && sa !== sb) stampG(sa, sb, 1 / b.ohms);
    if (b.t === "current") {
      if (sa >= 0) z[sa] -= b.amps;
      if (sb >= 0) z[sb] += b.amps;
      if (sa !== sb) stampG(sa, sb, 1 / b.ohms);
    }
  }
  sources.forEach(({ e, b }, k) => {
    const row = supers.length + k;
    const sa = at(find(e.a)),
      sb = at(find(e.b));
    // MNA: the source's current j flows from a through the source to b (so it leaves node a's KCL).
    if (sa >= 0) {
      A[sa * size + row] += 1;
      A[row * size + sa] += 1;
    }
    if (sb >= 0) {
      A[sb * size + row] -= 1;
      A[row * size + sb] -= 1;
    }
    z[row] = (b as { volts: number }).volts;
  });
  const x = solveDense(A, z, size);
  const superV = (r: string) => (r === ref ? 0 : x[index.get(r)!]);

  // 2. Currents through the loads and sources, and what each injects into its pins.
  const I = new Map<string, number>();
  const ac = new Map<string, number>();
  const inject = new Map<string, number>();
  const add = (n: string, v: number) => inject.set(n, (inject.get(n) ?? 0) + v);
  sources.forEach(({ e }, k) => {
    const j = x[supers.length + k];
    I.set(e.id, j);
    add(e.a, -j);
    add(e.b, j);
  });
  for (const { e, b } of elements) {
    let i: number;
    if (b.t === "resistor") i = (superV(find(e.a)) - superV(find(e.b))) / b.ohms;
    else if (b.t === "current") i = b.amps - (superV(find(e.b)) - superV(find(e.a))) / b.ohms;
    else continue;
    I.set(e.id, i);
    add(e.a, -i);
    add(e.b, i);
  }

  // 3. Inside each merged node: the conductors' currents (Kirchhoff's current law) and drops, from the wires' resistance.
  const members = new Map<string, string[]>();
  for (const n of parent.keys()) {
    const r = find(n);
    (members.get(r) ?? members.set(r, []).get(r)!).push(n);
  }
  const conductorsOf = new Map<string, { e: Element; ohms: number }[]>();
  for (const { e, b } of elements)
    if (b.t === "conductor") {
      const r = find(e.a);
      (conductorsOf.get(r) ?? conductorsOf.set(r, []).get(r)!).push({ e, ohms: b.ohms });
    }
  const sourceNodes = new Set(sources.flatMap(({ e }) => [e.a, e.b]));
  const V = new Map<string, number>();
  for (const [r, nodes] of members) {
    const base = superV(r);
    const conds = conductorsOf.get(r) ?? [];
    if (nodes.length === 1 || conds.length === 0) {
      for (const n of nodes) V.set(n, base);
      continue;
    }
    // The merged node's voltage is the solved one at a source's terminal (the battery post), else where most current enters.
    const anchor = nodes.includes(net.minus)
      ? net.minus
      : (nodes.find((n) => sourceNodes.has(n)) ?? nodes.reduce((m, n) => (Math.abs(inject.get(n) ?? 0) > Math.abs(inject.get(m) ?? 0) ? n : m), nodes[0]));
    const phi = conductorPotentials(nodes, conds, inject, anchor);
    for (const n of nodes) V.set(n, base + (phi.get(n) ?? 0));
    for (const { e, ohms } of conds) I.set(e.id, ((phi.get(e.a) ?? 0) - (phi.get(e.b) ?? 0)) / ohms);
  }

  // 4. AC from active stator windings: every conductor of the leads joined to the winding carries its current.
  for (const { e, b } of elements) {
    if (b.t !== "ac" || b.amps <= 0) continue;
    for (const r of new Set([find(e.a), find(e.b)])) {
      for (const { e: c } of conductorsOf.get(r) ?? []) ac.set(c.id, Math.max(ac.get(c.id) ?? 0, b.amps));
    }
    ac.set(e.id, b.amps);
  }

  // 5. How each node gets its voltage.
  const live = find(net.earth === "positive" ? net.minus : net.plus);
  const earthRoot = find(net.earth === "positive" ? net.plus : net.minus);
  const touchesLoad = new Set<string>();
  for (const { e, b } of elements)
    if (b.t === "resistor" || b.t === "voltage" || b.t === "current") {
      touchesLoad.add(find(e.a));
      touchesLoad.add(find(e.b));
    }
  const via = new Map<string, "live" | "earth" | "load" | "none">();
  for (const n of parent.keys()) {
    const r = find(n);
    via.set(n, r === live ? "live" : r === earthRoot ? "earth" : touchesLoad.has(r) ? "load" : "none");
  }
  return { V, I, ac, via };
}

/** Potentials inside one merged node, relative to its anchor, from the currents injected at its pins (Laplacian solve). */
function conductorPotentials(nodes: string[], conds: { e: Element; ohms: number }[], inject: Map<string, number>, anchor: string): Map<string, number> {
  const others = nodes.filter((n) => n !== anchor);
  const idx = new Map(others.map((n, i) => [n, i]));
  const m = others.length;
  const phi = new Map<string, number>([[anchor, 0]]);
  if (m === 0) return phi;
  const L = new Float64Array(m * m);
  const rhs = new Float64Array(m);
  for (const { e, ohms } of conds) {
    const g = 1 / ohms;
    const a = idx.get(e.a) ?? -1,
      b = idx.get(e.b) ?? -1;
    if (a >= 0) L[a * m + a] += g;
    if (b >= 0) L[b * m + b] += g;
    if (a >= 0 && b >= 0) {
      L[a * m + b] -= g;
      L[b * m + a] -= g;
    }
  }
  // A conductor-joined node is connected by construction; the injections sum to the anchor's share.
  for (const [n, i] of idx) {
    rhs[i] = inject.get(n) ?? 0;
    L[i * m + i] += 1e-12;
  }
  const sol = solveDense(L, rhs, m);
  for (const [n, i] of idx) phi.set(n, sol[i]);
  return phi;
}

/** Gaussian elimination with partial pivoting; A is n×n row-major and is overwritten. */
function solveDense(A: Float64Array, b: Float64Array, n: number): Float64Array {
  const x = Float64Array.from(b);
  for (let col = 0; col < n; col++) {
    let piv = col;
    let best = Math.abs(A[col * n + col]);
    for (let r = col + 1; r < n; r++) {
      const v = Math.abs(A[r * n + col]);
      if (v > best) {
        best = v;
        piv = r;
      }
    }
    if (best === 0) continue;
    if (piv !== col) {
      for (let c = col; c < n; c++) {
        const t = A[col * n + c];
        A[col * n + c] = A[piv * n + c];
        A[piv * n + c] = t;
      }
      const t = x[col];
      x[col] = x[piv];
      x[piv] = t;
    }
    const d = A[col * n + col];
    for (let r = col + 1; r < n; r++) {
      const f = A[r * n + col] / d;
      if (f === 0) continue;
      for (let c = col; c < n; c++) A[r * n + c] -= f * A[col * n + c];
      x[r] -= f * x[col];
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = x[r];
    for (let c = r + 1; c < n; c++) s -= A[r * n + c] * x[c];
    const d = A[r * n + r];
    x[r] = d === 0 ? 0 : s / d;
  }
  return x;
}
