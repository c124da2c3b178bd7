// Plain-English wording of a decoded colour, for pin tables, screen readers and ambiguity notes.

import type { ColourName } from "./names";
import type { DecodedColour } from "./decode";

function listOf(words: readonly string[]): string {
  if (words.length <= 1) return words.join("");
  return `${words.slice(0, -1).join(", ")} and ${words[words.length - 1]}`;
}

// Only a wire that is green-yellow and nothing else is the protective-earth colour (IEC 60757 / IEC 60445).
function alone(name: ColourName): string {
  return name === "green-yellow" ? "green-yellow (protective earth)" : name;
}

/** Human wording of a decoded colour, e.g. "white with red tracer", "red and blue" (IEC, no base), "green-yellow (protective earth)". */
export function describeColour(d: Pick<DecodedColour, "base" | "tracers" | "colours">): string {
  if (d.base) {
    const tracers = d.tracers.map((t) => t.name);
    if (tracers.length === 0) return alone(d.base.name);
    return `${d.base.name} with ${listOf(tracers)} tracer${tracers.length > 1 ? "s" : ""}`;
  }
  // IEC input names colours without saying which is the base, so none is called a tracer.
  if (d.colours.length === 1) return alone(d.colours[0]!);
  return listOf(d.colours);
}
