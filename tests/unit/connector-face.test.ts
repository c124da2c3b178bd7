import { describe, expect, it } from "vitest";
import { faceGeometry, gridLayout, layoutProblems, mirrorGeometry, type FaceGeometry, type HousingLayout } from "~/domain/connector-face";

// Invented housings (demo data only): a 2-way, a 6-way in two rows, a 12-cell grid with two
// cells unused and pin 1 moved, and a single-row 6-way with the latch on the side.
const layouts: [string, HousingLayout][] = [
  ["1×2", gridLayout(1, 2)],
  ["2×3", gridLayout(2, 3, { latch: "bottom" })],
  [
    "3×4 with gaps",
    gridLayout(3, 4, {
      missing: [
        [1, 4],
        [3, 1],
      ],
      pin1: "2",
      latch: "left",
    }),
  ],
  ["1×6", gridLayout(1, 6, { latch: "right" })],
];

const pos = (g: FaceGeometry, cavity: string) => {
  const c = g.cavities.find((k) => k.cavity === cavity);
  if (!c) throw new Error(`no cavity ${cavity}`);
  return { x: c.x, y: c.y };
};

describe("faceGeometry: mating face of this connector", () => {
  it("places cavities from the layout, origin at the housing centre, default pitch 10", () => {
    const g = faceGeometry(gridLayout(2, 3));
    expect(g).toMatchObject({ view: "mating", half: "this", pitch: 10, width: 40, height: 30, pin1: "1", latch: "top" });
    expect(pos(g, "1")).toEqual({ x: -10, y: -5 }); // row 1 col 1: top left
    expect(pos(g, "3")).toEqual({ x: 10, y: -5 });
    expect(pos(g, "5")).toEqual({ x: 0, y: 5 }); // centre column
  });

  it("puts the mean of every full grid at (0, 0)", () => {
    for (const [rows, cols] of [
      [1, 2],
      [2, 3],
      [3, 4],
      [1, 6],
      [5, 5],
    ] as const) {
      const g = faceGeometry(gridLayout(rows, cols));
      const n = g.cavities.length;
      expect(n).toBe(rows * cols);
      expect(g.cavities.reduce((s, c) => s + c.x, 0) / n).toBeCloseTo(0, 12);
      expect(g.cavities.reduce((s, c) => s + c.y, 0) / n).toBeCloseTo(0, 12);
    }
  });

  it("leaves a one-pitch cell per cavity plus half a pitch of wall round the outermost cells, at any pitch", () => {
    for (const [name, layout] of layouts) {
      for (const pitch of [10, 2.54, 4]) {
        const g = faceGeometry(layout, { pitch });
        expect(g.width, name).toBeCloseTo(layout.cols * pitch + pitch, 12);
        expect(g.height, name).toBeCloseTo(layout.rows * pitch + pitch, 12);
        for (const c of g.cavities) {
          expect(Math.abs(c.x) + pitch, name).toBeLessThanOrEqual(g.width / 2 + 1e-9);
          expect(Math.abs(c.y) + pitch, name).toBeLessThanOrEqual(g.height / 2 + 1e-9);
        }
      }
    }
  });

  it("rejects a pitch that is not a positive number", () => {
    expect(() => faceGeometry(gridLayout(1, 2), { pitch: 0 })).toThrow(RangeError);
    expect(() => faceGeometry(gridLayout(1, 2), { pitch: Number.NaN })).toThrow(RangeError);
  });
});

describe("mirrorGeometry", () => {
  // Source: geometry of a reflection: applying it twice is the identity.
  it("is its own inverse", () => {
    for (const [name, layout] of layouts) {
      for (const view of ["mating", "wire"] as const) {
        for (const half of ["this", "mate"] as const) {
          const g = faceGeometry(layout, { view, half });
          expect(mirrorGeometry(mirrorGeometry(g)), name).toEqual(g);
        }
      }
    }
  });

  it("negates x, keeps y, swaps a left/right latch and keeps top/bottom", () => {
    const g = faceGeometry(gridLayout(1, 2, { latch: "left" }));
    const m = mirrorGeometry(g);
    expect(m.cavities).toEqual([
      { cavity: "1", x: 5, y: 0 },
      { cavity: "2", x: -5, y: 0 },
    ]);
    expect(m.latch).toBe("right");
    expect(mirrorGeometry({ ...g, latch: "right" }).latch).toBe("left");
    expect(mirrorGeometry({ ...g, latch: "top" }).latch).toBe("top");
    expect(mirrorGeometry({ ...g, latch: "bottom" }).latch).toBe("bottom");
  });

  it("keeps a centre-column cavity exactly at x = 0 (no negative zero)", () => {
    const m = mirrorGeometry(faceGeometry(gridLayout(2, 3)));
    expect(Object.is(pos(m, "2").x, 0)).toBe(true);
    expect(Object.is(pos(m, "5").x, 0)).toBe(true);
  });
});

describe("faceGeometry: wire side and mating half", () => {
  // Source: common practice: a connector seen from the wire side is the mirror image of its
  // mating face; the mating half is the mirror image too.
  it("draws the wire side as the mirror image of the mating face, labels unchanged", () => {
    for (const [name, layout] of layouts) {
      const mating = faceGeometry(layout);
      const wire = faceGeometry(layout, { view: "wire" });
      expect(wire.view).toBe("wire");
      expect(wire.pin1, name).toBe(layout.pin1);
      expect(wire.width).toBe(mating.width);
      expect(wire.height).toBe(mating.height);
      for (const c of mating.cavities) {
        expect(pos(wire, c.cavity), `${name} cavity ${c.cavity}`).toEqual({ x: c.x === 0 ? 0 : -c.x, y: c.y });
      }
      expect(wire.cavities).toEqual(mirrorGeometry(mating).cavities);
      expect(wire.latch).toBe(mirrorGeometry(mating).latch);
    }
  });

  it("draws the mating half, seen from its own face, as the mirror of this face: cavity n meets cavity n", () => {
    for (const [name, layout] of layouts) {
      const mine = faceGeometry(layout);
      const mate = faceGeometry(layout, { half: "mate" });
      expect(mate.half).toBe("mate");
      // Face to face, the mate's own left is our right: its x is our −x for the same label.
      for (const c of mine.cavities) expect(pos(mate, c.cavity).x, name).toBe(c.x === 0 ? 0 : -c.x);
      expect(mate.latch).toBe(mirrorGeometry(mine).latch);
    }
  });

  it("shows the mate from its wire side with this connector's mating-face positions", () => {
    for (const [name, layout] of layouts) {
      const mine = faceGeometry(layout);
      const mateWire = faceGeometry(layout, { half: "mate", view: "wire" });
      expect(mateWire.cavities, name).toEqual(mine.cavities);
      expect(mateWire.latch, name).toBe(mine.latch);
      expect(mateWire).toEqual({ ...mine, view: "wire", half: "mate" });
    }
  });

  it("moves pin 1 to the other side unless it is on the centre column", () => {
    for (const [name, layout] of layouts) {
      const mating = pos(faceGeometry(layout), layout.pin1);
      const wire = pos(faceGeometry(layout, { view: "wire" }), layout.pin1);
      expect(mating.x, name).not.toBe(0);
      expect(Math.sign(wire.x), name).toBe(-Math.sign(mating.x));
    }
    const centred = gridLayout(3, 3, { pin1: "5" });
    expect(pos(faceGeometry(centred, { view: "wire" }), "5")).toEqual(pos(faceGeometry(centred), "5"));
  });

  it("flips the latch only when it is on the left or right", () => {
    for (const latch of ["top", "bottom", "left", "right"] as const) {
      const flipped = latch === "left" ? "right" : latch === "right" ? "left" : latch;
      const layout = gridLayout(2, 3, { latch });
      expect(faceGeometry(layout).latch).toBe(latch);
      expect(faceGeometry(layout, { view: "wire" }).latch).toBe(flipped);
      expect(faceGeometry(layout, { half: "mate" }).latch).toBe(flipped);
      expect(faceGeometry(layout, { view: "wire", half: "mate" }).latch).toBe(latch);
    }
  });
});

describe("layoutProblems", () => {
  it("accepts every generated layout", () => {
    for (const [name, layout] of layouts) expect(layoutProblems(layout), name).toEqual([]);
  });

  it("catches two cavities with one label", () => {
    const layout: HousingLayout = {
      rows: 1,
      cols: 2,
      pin1: "1",
      latch: "top",
      cavities: [
        { cavity: "1", row: 1, col: 1 },
        { cavity: "1", row: 1, col: 2 },
      ],
    };
    const problems = layoutProblems(layout);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/"1" is used more than once/);
  });

  it("catches two cavities in one cell", () => {
    const layout: HousingLayout = {
      rows: 1,
      cols: 2,
      pin1: "1",
      latch: "top",
      cavities: [
        { cavity: "1", row: 1, col: 1 },
        { cavity: "2", row: 1, col: 1 },
      ],
    };
    expect(layoutProblems(layout)).toEqual([`Cavities "1" and "2" are both at row 1, column 1.`]);
  });

  it("catches cavities outside the grid", () => {
    for (const [row, col] of [
      [0, 1],
      [1, 0],
      [3, 1],
      [1, 4],
      [1.5, 1],
    ]) {
      const layout: HousingLayout = {
        rows: 2,
        cols: 3,
        pin1: "1",
        latch: "top",
        cavities: [
          { cavity: "1", row: 1, col: 1 },
          { cavity: "X", row, col },
        ],
      };
      const problems = layoutProblems(layout);
      expect(problems, `${row},${col}`).toHaveLength(1);
      expect(problems[0]).toMatch(/Cavity "X"/);
    }
  });

  it("catches a pin 1 that names no cavity", () => {
    const problems = layoutProblems(gridLayout(2, 2, { pin1: "A" }));
    expect(problems).toEqual([`Pin 1 is given as "A", but no cavity has that label.`]);
    // The gap took cavity "4" away from a 2×2 grid numbered 1..3.
    expect(layoutProblems(gridLayout(2, 2, { missing: [[2, 2]], pin1: "4" }))).toHaveLength(1);
  });

  it("catches an empty grid, an empty label and a bad latch side", () => {
    const bad = { rows: 0, cols: 2, pin1: "1", latch: "front", cavities: [] } as unknown as HousingLayout;
    const problems = layoutProblems(bad);
    expect(problems.some((p) => /at least one row/.test(p))).toBe(true);
    expect(problems.some((p) => /latch side/.test(p))).toBe(true);
    expect(problems.some((p) => /no cavities/.test(p))).toBe(true);
    const blank: HousingLayout = { rows: 1, cols: 1, pin1: "", latch: "top", cavities: [{ cavity: " ", row: 1, col: 1 }] };
    expect(layoutProblems(blank).some((p) => /no label/.test(p))).toBe(true);
  });
});

describe("gridLayout", () => {
  it("numbers cavities row by row, left to right, with pin 1 and the latch defaulted", () => {
    const l = gridLayout(2, 3);
    expect(l).toEqual({
      rows: 2,
      cols: 3,
      pin1: "1",
      latch: "top",
      cavities: [
        { cavity: "1", row: 1, col: 1 },
        { cavity: "2", row: 1, col: 2 },
        { cavity: "3", row: 1, col: 3 },
        { cavity: "4", row: 2, col: 1 },
        { cavity: "5", row: 2, col: 2 },
        { cavity: "6", row: 2, col: 3 },
      ],
    });
  });

  it("skips missing cells and keeps the numbering continuous", () => {
    const l = gridLayout(3, 4, {
      missing: [
        [1, 4],
        [3, 1],
      ],
      pin1: "2",
      latch: "left",
    });
    expect(l.cavities).toHaveLength(10);
    expect(l.cavities.map((c) => c.cavity)).toEqual(["1", "2", "3", "4", "5", "6", "7", "8", "9", "10"]);
    expect(l.cavities.find((c) => c.row === 1 && c.col === 4)).toBeUndefined();
    expect(l.cavities.find((c) => c.row === 3 && c.col === 1)).toBeUndefined();
    expect(l.cavities.find((c) => c.cavity === "4")).toEqual({ cavity: "4", row: 2, col: 1 });
    expect(l.cavities.find((c) => c.cavity === "8")).toEqual({ cavity: "8", row: 3, col: 2 });
    expect(l).toMatchObject({ pin1: "2", latch: "left", rows: 3, cols: 4 });
    // A gap keeps the grid (and so the centre) where it was: cavity 1 is still top left.
    expect(pos(faceGeometry(l), "1")).toEqual({ x: -15, y: -10 });
  });
});
