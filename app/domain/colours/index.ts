// Colour notation: the one public entry point (import from "~/domain/colours").

export {
  COLOUR_NAMES,
  COLOUR_SYSTEM_IDS,
  IEC_CODES,
  contrastRatio,
  iecCode,
  iecCombination,
  isColourName,
  swatch,
  type ColourName,
  type ColourSystemId,
} from "./names";
export { SYSTEM_NAMES, colourSystems, encodeColour } from "./systems";
export { decodeColour, type Ambiguity, type ColourPart, type DecodeResult, type DecodedColour } from "./decode";
export { describeColour } from "./describe";
