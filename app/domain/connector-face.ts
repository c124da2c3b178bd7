// Face-view geometry of a connector housing: where each cavity sits when you look at the
// mating face or the wire side, of this connector or of the one it mates with.
// Pure TypeScript: the card page, the print view and /api/v1/connectors/:slug/face all use it.

export type Latch = "top" | "bottom" | "left" | "right";
export type FaceSide = "mating" | "wire";
export type FaceHalf = "this" | "mate";

/** A housing layout as stored: rows × cols grid, the cavities that exist (row, col 1-based, row 1 at the top, col 1 at the left) AS SEEN LOOKING AT THIS CONNECTOR'S MATING FACE; pin1 is a cavity label; latch the side of the housing the latch is on, in the same view. */
export interface HousingLayout {
  rows: number;
  cols: number;
  cavities: { cavity: string; row: number; col: number }[];
  pin1: string;
  latch: Latch;
}

/** A face view ready to draw: cavity centres in housing units, origin at the housing's centre, x to the viewer's right, y down. */
export interface FaceGeometry {
  view: FaceSide;
  half: FaceHalf;
  /** Outline of the housing: cols·pitch plus half a pitch of wall on each side. */
  width: number;
  /** Outline of the housing: rows·pitch plus half a pitch of wall on each side. */
  height: number;
  /** Centre-to-centre distance of neighbouring cavities. */
  pitch: number;
  cavities: { cavity: string; x: number; y: number }[];
  pin1: string;
  latch: Latch;
}

export const DEFAULT_PITCH = 10;

const LATCH_SIDES: readonly Latch[] = ["top", "bottom", "left", "right"];

// Negating 0 gives -0, which serialises as 0 but fails strict equality checks in tests and
// caches; a centre-column cavity must stay exactly at x = 0.
function negate(x: number): number {
  return x === 0 ? 0 : -x;
}

function mirrorLatch(latch: Latch): Latch {
  if (latch === "left") return "right";
  if (latch === "right") return "left";
  return latch;
}

/** Cavity centres in one coordinate system whose origin is the housing's centre, x to the viewer's right, y down. */
export function faceGeometry(layout: HousingLayout, opts: { view?: FaceSide; half?: FaceHalf; pitch?: number } = {}): FaceGeometry {
  const view = opts.view ?? "mating";
  const half = opts.half ?? "this";
  const pitch = opts.pitch ?? DEFAULT_PITCH;
  if (!Number.isFinite(pitch) || pitch <= 0) throw new RangeError(`pitch must be a positive number, got ${pitch}`);

  const cx = (layout.cols + 1) / 2;
  const cy = (layout.rows + 1) / 2;
  const base: FaceGeometry = {
    view,
    half,
    // Each cavity owns a cell one pitch square; half a pitch of housing wall beyond the
    // outermost cells keeps cavities off the outline and leaves room for the pin-1 marker.
    width: layout.cols * pitch + pitch,
    height: layout.rows * pitch + pitch,
    pitch,
    cavities: layout.cavities.map((c) => ({
      cavity: c.cavity,
      x: (c.col - cx) * pitch,
      y: (c.row - cy) * pitch,
    })),
    pin1: layout.pin1,
    latch: layout.latch,
  };

  // Turning the housing round to its wire side is one left↔right reflection; looking at the
  // mate from its own face is another. Two reflections cancel, so mate + wire side shows the
  // same positions as this connector's mating face.
  const reflections = (view === "wire" ? 1 : 0) + (half === "mate" ? 1 : 0);
  return reflections % 2 === 1 ? mirrorGeometry(base) : base;
}

/** Mirror a geometry left↔right (x → −x, latch left↔right); view and half labels are kept, the caller relabels. */
export function mirrorGeometry(g: FaceGeometry): FaceGeometry {
  return {
    ...g,
    cavities: g.cavities.map((c) => ({ cavity: c.cavity, x: negate(c.x), y: c.y })),
    latch: mirrorLatch(g.latch),
  };
}

/** Validate a layout: every cavity inside the grid, no two cavities in one cell, labels unique, pin1 exists. Returns a list of problems (empty = fine). */
export function layoutProblems(layout: HousingLayout): string[] {
  const problems: string[] = [];
  const { rows, cols } = layout;
  const gridOk = Number.isInteger(rows) && rows >= 1 && Number.isInteger(cols) && cols >= 1;
  if (!Number.isInteger(rows) || rows < 1) problems.push(`The grid needs at least one row (got ${rows}).`);
  if (!Number.isInteger(cols) || cols < 1) problems.push(`The grid needs at least one column (got ${cols}).`);
  if (!LATCH_SIDES.includes(layout.latch)) problems.push(`The latch side must be top, bottom, left or right (got "${layout.latch}").`);
  if (layout.cavities.length === 0) problems.push("The layout has no cavities.");

  const labels = new Set<string>();
  const cells = new Map<string, string>();
  for (const c of layout.cavities) {
    const label = c.cavity;
    if (label.trim() === "") {
      problems.push(`A cavity at row ${c.row}, column ${c.col} has no label.`);
    } else if (labels.has(label)) {
      problems.push(`Cavity label "${label}" is used more than once.`);
    }
    labels.add(label);

    if (!Number.isInteger(c.row) || !Number.isInteger(c.col)) {
      problems.push(`Cavity "${label}" needs whole-number row and column (got ${c.row}, ${c.col}).`);
      continue;
    }
    if (gridOk && (c.row < 1 || c.row > rows || c.col < 1 || c.col > cols)) {
      problems.push(`Cavity "${label}" at row ${c.row}, column ${c.col} is outside the ${rows}×${cols} grid.`);
    }
    const cell = `${c.row},${c.col}`;
    const other = cells.get(cell);
    if (other !== undefined) {
      problems.push(`Cavities "${other}" and "${label}" are both at row ${c.row}, column ${c.col}.`);
    } else {
      cells.set(cell, label);
    }
  }

  if (!labels.has(layout.pin1)) problems.push(`Pin 1 is given as "${layout.pin1}", but no cavity has that label.`);
  return problems;
}

/** Build a simple layout: `rows`×`cols`, cavities numbered "1".."n" row by row left to right, optionally skipping cells (`missing`: list of [row,col]). */
export function gridLayout(rows: number, cols: number, opts: { missing?: [number, number][]; pin1?: string; latch?: Latch } = {}): HousingLayout {
  const missing = new Set((opts.missing ?? []).map(([r, c]) => `${r},${c}`));
  const cavities: HousingLayout["cavities"] = [];
  for (let row = 1; row <= rows; row++) {
    for (let col = 1; col <= cols; col++) {
      if (missing.has(`${row},${col}`)) continue;
      cavities.push({ cavity: String(cavities.length + 1), row, col });
    }
  }
  return { rows, cols, cavities, pin1: opts.pin1 ?? "1", latch: opts.latch ?? "top" };
}
