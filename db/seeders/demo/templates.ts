/**
 * Loom templates for the invented demo families. Each template takes the family's own colour codes (in its maker's
 * notation) and housing choices, so families share an architecture but not a loom. The shared parts (lights,
 * indicators, horn, instruments, coils, starter) are in parts.ts. All names, colours and values are invented for the
 * demo; none is any real machine's diagram.
 */
export { boxerTwin, transistorFour } from "./templates-electric-start.ts";
export { pointsTwin, sixVoltSingle } from "./templates-kick-start.ts";
