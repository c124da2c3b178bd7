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
export { EN_COLOUR_WORDS, SYSTEM_NAMES, colourSystems, encodeColour } from "./systems";
export {
  HOUSE_STYLES,
  HOUSE_STYLE_IDS,
  JIS_HOUSE_ORDER,
  houseFor,
  houseStyleOf,
  houseStyles,
  isHouseStyleId,
  type HouseStyle,
  type HouseStyleId,
} from "./house-styles";
export {
  decodeColour,
  isEnglishColourWords,
  type Ambiguity,
  type ColourPart,
  type DecodeOptions,
  type DecodeResult,
  type DecodeWarning,
  type DecodedColour,
} from "./decode";
export { describeColour } from "./describe";
