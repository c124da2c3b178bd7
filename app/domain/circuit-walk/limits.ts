// The circuit walk's limits (each with where it comes from) and the element kinds it tells apart.

/** Allowed loss across one closed contact or joint under load, V (common practice). */
export const CONTACT_DROP_V = 0.2;
/** Allowed loss over a whole circuit's supply (or earth) side under load, V (common practice). */
export const CIRCUIT_DROP_V = 0.5;
/** A loss of more than this share of the battery's voltage across one stretch is taken as an open, not a high resistance. */
export const OPEN_SHARE = 0.3;
/** A stretch carrying less than this is taken as unloaded, A. */
export const LOADED_A = 0.05;
/** A meter's own noise and the last digit: what an unloaded stretch may differ by, V. */
export const NOISE_V = 0.1;

export const CONTACT_KINDS = new Set(["contact", "fuse", "mate", "breaker", "transistor"]);
export const LOAD_KINDS = new Set(["winding", "load", "lamp", "sense", "source"]);

export const round2 = (x: number) => Math.round(x * 100) / 100;
