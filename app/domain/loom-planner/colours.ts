// The loom planner's colours: the factory's, or Loomlore's simple scheme with one colour per net, and the legend.

import { encodeColour, type ColourName } from "../colours";
import { fail } from "./rules";
import type { Topology } from "./topology";
import type { CutRow, LegendRow, PlannerCircuit, PlannerInput } from "./types";

/** Loomlore's simple scheme, for the page and the assumptions: one line per rule. */
export const SIMPLE_SCHEME: readonly string[] = Object.freeze([
  "earth: black, and only earth (every wire joined to the frame or the earth post through no switch, fuse or load)",
  "battery feed, unswitched (fused or not): red",
  "switched feeds shared by several systems, and the ignition's own feeds: white",
  "coil negatives and the points' leads: green",
  "pickups and other signal wires: grey",
  "charging (stator leads, field, D+): yellow",
  "starting (button to relay, relay to motor): brown",
  "lighting: blue; indicators and horn: orange; instruments and warning lamps: violet; anything else: pink",
  "each net has its own colour: the first of a group plain, the others with a tracer (green and yellow never together: IEC 60757 keeps GNYE for the protective earth)",
]);

const GROUP_BASE: Record<string, ColourName> = {
  feed: "red",
  switched: "white",
  negative: "green",
  signal: "grey",
  charging: "yellow",
  starting: "brown",
  lighting: "blue",
  signals: "orange",
  instruments: "violet",
  other: "pink",
};
const TRACERS: readonly ColourName[] = ["white", "black", "red", "blue", "green", "yellow", "orange", "violet", "grey", "brown", "pink"];

// ---------------------------------------------------------------------------------------------
// Colours

/** How to say what a net carries, for the legend. */
function netMeaning(net: string, rows: CutRow[], input: PlannerInput): string {
  const mine = rows.filter((r) => r.net === net);
  const circuits = [...new Set(mine.flatMap((r) => r.circuits))].map((s) => input.circuits.find((c) => c.slug === s)?.name ?? s);
  return `${mine.map((r) => `${r.from} → ${r.to}`).join("; ")} (${circuits.join(", ")})`;
}

function groupOf(net: string, rows: CutRow[], topo: Topology, input: PlannerInput, kept: PlannerCircuit[]): keyof typeof GROUP_BASE | "earth" {
  if (topo.earthNets.has(net)) return "earth";
  const mine = rows.filter((r) => r.net === net);
  if (mine.every((r) => r.role === "signal")) return "signal";
  const circuits = kept.filter((c) => mine.some((r) => r.circuits.includes(c.slug)));
  const systems = new Set(circuits.map((c) => c.system));
  const live = input.network.earth === "positive" ? input.network.minus : input.network.plus;
  const liveNet = topo.netOf.get(
    input.wires.find((w) => {
      const e = input.network.elements.find((x) => x.id === w.id);
      return e && (e.a === live || e.b === live);
    })?.id ?? "",
  );
  if (net === liveNet) return "feed";
  if (systems.has("charging")) return "charging";
  // Joined to the live post through fuses only (no switch): still an unswitched feed.
  const fed = circuits.filter((c) => c.from === live);
  const onlyFuses =
    fed.length > 0 &&
    fed.every((c) => {
      const t = topo.circuits.get(c.slug)!;
      const at = t.supplyOrder.findIndex((id) => mine.some((r) => r.wire === id));
      return (
        at >= 0 &&
        t.supplyOrder
          .slice(0, at)
          .every(
            (id) => !t.contacts.includes(id) && !input.network.elements.find((e) => e.id === id && e.kind !== "wire" && e.kind !== "mate" && e.kind !== "fuse"),
          )
      );
    });
  if (onlyFuses) return "feed";
  const returnSide = circuits.length > 0 && circuits.every((c) => topo.circuits.get(c.slug)!.ret.some((id) => mine.some((r) => r.wire === id)));
  if (systems.size > 1) return "switched";
  const only = [...systems][0];
  if (only === "ignition") return returnSide ? "negative" : "switched";
  if (only === "starting") return "starting";
  if (only === "lighting") return "lighting";
  if (only === "signals") return "signals";
  if (only === "instruments") return "instruments";
  return "other";
}

export function colourRows(rows: CutRow[], topo: Topology, input: PlannerInput, kept: PlannerCircuit[]): LegendRow[] {
  const legend = new Map<string, LegendRow>();
  const write = (colours: ColourName[]) => {
    // Every option below has a base: colours[0] is there.
    const t = encodeColour(colours[0]!, colours.slice(1), input.notation);
    return t ?? encodeColour(colours[0]!, colours.slice(1), "en") ?? colours.join("/");
  };
  if (input.scheme === "factory") {
    for (const r of rows) {
      const w = input.wires.find((x) => x.id === r.wire)!;
      r.colours = [...w.colours];
      r.colour = w.code;
      if (!w.colours.length) r.notes.push("Factory colour not recorded.");
      const row = legend.get(r.colour) ?? { colour: r.colour, colours: r.colours, nets: [], meaning: "" };
      if (!row.nets.includes(r.net)) row.nets.push(r.net);
      legend.set(r.colour, row);
    }
    for (const row of legend.values()) row.meaning = row.nets.map((n) => netMeaning(n, rows, input)).join(" | ");
    return [...legend.values()];
  }
  // Simple scheme: one colour per net, never shared, never black unless earth; base + at most one tracer.
  // First the live feed, then in the order the cut list meets them (battery outwards).
  const nets = [...new Set(rows.map((r) => r.net))];
  const used = new Set<string>(); // written codes (IEC writes R/W and W/R alike, so the written form must differ too)
  const taken = new Set<string>();
  const ok = (v: ColourName[]) => new Set(v).size === v.length && !(v.includes("green") && v.includes("yellow")) && !(v.length === 1 && v[0] === "black");
  const assign = new Map<string, ColourName[]>();
  const earthColours: ColourName[] = ["black"];
  const groups = new Map<string, string>(nets.map((n) => [n, groupOf(n, rows, topo, input, kept)]));
  for (const n of nets) {
    const g = groups.get(n)!;
    if (g === "earth") {
      assign.set(n, earthColours);
      continue;
    }
    const base = GROUP_BASE[g]!; // earth is handled above; every other group is a key of GROUP_BASE
    const options: ColourName[][] = [[base], ...TRACERS.map((t) => [base, t] as ColourName[])];
    // When a group runs out, any free pair that keeps the rules.
    for (const b of Object.values(GROUP_BASE)) for (const t of TRACERS) options.push([b, t]);
    const pick = options.find((v) => ok(v) && !taken.has(v.join("/")) && !used.has(write(v)));
    if (!pick) throw fail("keep", "more nets than the simple scheme has colours for: use the factory colours");
    taken.add(pick.join("/"));
    used.add(write(pick));
    assign.set(n, pick);
  }
  for (const r of rows) {
    r.colours = assign.get(r.net)!;
    r.colour = write(r.colours);
    const row = legend.get(r.colour) ?? { colour: r.colour, colours: r.colours, nets: [], meaning: "" };
    if (!row.nets.includes(r.net)) row.nets.push(r.net);
    legend.set(r.colour, row);
  }
  for (const row of legend.values()) {
    row.meaning = row.colours.length === 1 && row.colours[0] === "black" ? "earth" : row.nets.map((n) => netMeaning(n, rows, input)).join(" | ");
  }
  return [...legend.values()];
}
