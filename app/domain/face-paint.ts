/**
 * How each cavity of a face view is painted from its pin's colour code: base swatch, tracer swatches, label ink and a
 * title. One rule for the published card (library service), the proposal editor's preview and the moderator's diff.
 */
import { decodeColour, describeColour, swatch, type ColourSystemId, type HouseStyleId } from "./colours";

export interface CavityPaint {
  cavity: string;
  code: string | null;
  baseHex: string | null;
  tracerHexes: string[];
  ink?: string;
  title?: string;
}

/** Paint for every pin: unpainted for an empty cavity, a "not understood" title for a code the notation (and the make's house) cannot read. */
export function facePaint(
  pins: readonly { cavity: string; code: string | null }[],
  system: ColourSystemId,
  houseStyle: HouseStyleId | null = null,
): CavityPaint[] {
  return pins.map((p) => {
    if (!p.code) return { cavity: p.cavity, code: null, baseHex: null, tracerHexes: [] };
    const d = decodeColour(p.code, system, { houseStyle });
    if (!d.ok) return { cavity: p.cavity, code: p.code, baseHex: null, tracerHexes: [], title: `${p.code} (not understood)` };
    const [base, ...tracers] = d.value.colours;
    return {
      cavity: p.cavity,
      code: p.code,
      baseHex: swatch(base!).hex,
      ink: swatch(base!).ink, // a decoded code has at least one colour
      tracerHexes: tracers.map((c) => swatch(c).hex),
      title: `${p.code}, ${describeColour(d.value)}`,
    };
  });
}
