import { useId, type JSX } from "react";
import type { FaceGeometry, Latch } from "~/domain/connector-face";

/** How one cavity is painted: its wire's code as written, base and tracer swatches, optional text ink, title and link. */
export interface FaceCavityPaint {
  cavity: string;
  /** The colour code as the card writes it (e.g. "W/R"); null when the cavity is empty or unknown. */
  code: string | null;
  baseHex: string | null;
  tracerHexes: string[];
  /** Colour for the cavity label drawn on the base fill; picked from the fill's lightness when omitted. */
  ink?: string;
  /** Description read after "Cavity N: " (e.g. "W/R white with red tracer"); defaults to the code. */
  title?: string;
  href?: string;
}

// One palette for every face view: near-black lines and text on warm paper, so the drawing
// stays legible on a phone in daylight and in a black-and-white print.
const LINE = "#1b1b1b";
const PAPER = "#ffffff";
const HOUSING_FILL = "#f3f2ee";
const LATCH_FILL = "#d8d6cf";
const MUTED = "#5a5a5a";

/** Relative luminance (sRGB) of a #rgb / #rrggbb colour, or null when it is not one. */
function luminance(hex: string): number | null {
  const m = /^#?([0-9a-f]{3}|[0-9a-f]{6})$/i.exec(hex.trim());
  if (!m) return null;
  const h = m[1].length === 3 ? [...m[1]].map((c) => c + c).join("") : m[1];
  const [r, g, b] = [0, 2, 4].map((i) => {
    const v = parseInt(h.slice(i, i + 2), 16) / 255;
    return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

function inkFor(baseHex: string | null): string {
  const l = baseHex ? luminance(baseHex) : null;
  return l !== null && l < 0.2 ? "#ffffff" : LINE;
}

function haloFor(ink: string): string {
  const l = luminance(ink);
  return l !== null && l > 0.5 ? LINE : "#ffffff";
}

function fmt(n: number): string {
  return String(Math.round(n * 1000) / 1000);
}

/** The latch tab: a block standing out from the housing wall on its side, with its word beside it. */
function LatchTab(props: { latch: Latch; w: number; h: number; p: number; showText: boolean }) {
  const { latch, w, h, p, showText } = props;
  const depth = 0.45 * p;
  const overlap = 0.15 * p; // tucks the tab under the wall stroke so the two read as one part
  const horizontal = latch === "top" || latch === "bottom";
  const along = Math.min((horizontal ? w : h) * 0.45, 2.4 * p);
  let x: number,
    y: number,
    tw: number,
    th: number,
    tx: number,
    ty: number,
    rotate = 0;
  const gap = 0.25 * p;
  const font = 0.24 * p;
  if (latch === "top") {
    [x, y, tw, th] = [-along / 2, -h / 2 - depth, along, depth + overlap];
    [tx, ty] = [0, -h / 2 - depth - gap];
  } else if (latch === "bottom") {
    [x, y, tw, th] = [-along / 2, h / 2 - overlap, along, depth + overlap];
    [tx, ty] = [0, h / 2 + depth + gap + font * 0.75];
  } else if (latch === "left") {
    [x, y, tw, th] = [-w / 2 - depth, -along / 2, depth + overlap, along];
    [tx, ty, rotate] = [-w / 2 - depth - gap, 0, -90];
  } else {
    [x, y, tw, th] = [w / 2 - overlap, -along / 2, depth + overlap, along];
    [tx, ty, rotate] = [w / 2 + depth + gap, 0, 90];
  }
  return (
    <g data-latch={latch}>
      <rect x={fmt(x)} y={fmt(y)} width={fmt(tw)} height={fmt(th)} rx={fmt(0.12 * p)} fill={LATCH_FILL} stroke={LINE} strokeWidth={fmt(0.06 * p)} />
      {showText ? (
        <text
          x={fmt(tx)}
          y={fmt(ty)}
          fontSize={fmt(font)}
          fill={LINE}
          textAnchor="middle"
          letterSpacing={fmt(0.02 * p)}
          transform={rotate ? `rotate(${rotate} ${fmt(tx)} ${fmt(ty)})` : undefined}
        >
          latch
        </text>
      ) : null}
    </g>
  );
}

/** A connector face drawn from its geometry: housing, latch tab, and every cavity in its wire's colours with label and code. */
export function FaceView(props: {
  geometry: FaceGeometry;
  paint: FaceCavityPaint[];
  highlight?: string | null;
  size?: "full" | "thumb";
  caption?: string;
  className?: string;
}): JSX.Element {
  const { geometry: g, paint, highlight = null, size = "full", className } = props;
  const full = size === "full";
  // useId output can contain characters that break url(#…) references; keep it to a safe set.
  const uid = "fv" + useId().replace(/[^A-Za-z0-9_-]/g, "");
  const clipId = `${uid}-cavity`;

  const p = g.pitch;
  const w = g.width;
  const h = g.height;
  // Room outside the housing for the latch tab and its word on the latch side only; coordinates keep
  // their origin at the housing's centre, the viewBox just frames what is drawn (no empty band).
  const tab = (full ? 0.95 : 0.55) * p;
  const edge = 0.15 * p;
  const [left, right, top, bottom] = [
    g.latch === "left" ? tab : edge,
    g.latch === "right" ? tab : edge,
    g.latch === "top" ? tab : edge,
    g.latch === "bottom" ? tab : edge,
  ];
  const vb = [-w / 2 - left, -h / 2 - top, w + left + right, h + top + bottom];

  const caption = props.caption ?? `${g.view === "wire" ? "Wire side" : "Mating face"} of ${g.half === "mate" ? "the mating connector" : "this connector"}`;
  const byCavity = new Map(paint.map((c) => [c.cavity, c]));

  // Cavity cell (one pitch square round the centre): the cavity sits in the upper part, its code
  // under it. In a thumbnail there is no text, so the cavity is centred and a little larger.
  const s = (full ? 0.52 : 0.62) * p;
  const dy = full ? -0.13 * p : 0;
  const r = 0.16 * s;
  const stroke = 0.05 * p;
  const labelFont = 0.24 * p;
  const codeBaseline = 0.44 * p;

  return (
    <svg
      xmlns="http://www.w3.org/2000/svg"
      viewBox={vb.map(fmt).join(" ")}
      width={full ? "100%" : 96}
      role="img"
      aria-label={caption}
      className={className}
      style={full ? { maxWidth: `min(100%, ${Math.round(vb[2] * 7)}px)`, height: "auto" } : { height: "auto" }}
      fontFamily="inherit"
      data-view={g.view}
      data-half={g.half}
    >
      <title>{caption}</title>
      <defs>
        {/* One clip for all cavities: clipPath user space is the referencing cavity's own. */}
        <clipPath id={clipId} clipPathUnits="userSpaceOnUse">
          <rect x={fmt(-s / 2)} y={fmt(-s / 2)} width={fmt(s)} height={fmt(s)} rx={fmt(r)} />
        </clipPath>
      </defs>

      <LatchTab latch={g.latch} w={w} h={h} p={p} showText={full} />
      <rect x={fmt(-w / 2)} y={fmt(-h / 2)} width={fmt(w)} height={fmt(h)} rx={fmt(0.28 * p)} fill={HOUSING_FILL} stroke={LINE} strokeWidth={fmt(0.08 * p)} />

      {g.cavities.map((c) => {
        const pc = byCavity.get(c.cavity);
        const empty = !pc || pc.code === null;
        const isPin1 = c.cavity === g.pin1;
        const isHighlight = highlight !== null && c.cavity === highlight;
        const fill = !empty && pc.baseHex ? pc.baseHex : PAPER;
        const tracers = empty ? [] : pc.tracerHexes;
        const ink = pc?.ink ?? (empty ? MUTED : inkFor(pc.baseHex));
        const description = empty ? "empty" : (pc.title ?? pc.code);
        const cavityTitle = `Cavity ${c.cavity}${isPin1 ? " (pin 1)" : ""}: ${description}`;

        // Tracers as diagonal bands across the cavity, evenly spread, clipped to its outline;
        // each band is edged so a light tracer still shows on a light base.
        const bandW = s * (tracers.length <= 1 ? 0.26 : 0.18);
        const spread = s * 0.42;
        const bands = tracers.map((hex, i) => {
          const off = (i - (tracers.length - 1) / 2) * spread;
          return (
            <rect
              key={i}
              x={fmt(-s)}
              y={fmt(off - bandW / 2)}
              width={fmt(2 * s)}
              height={fmt(bandW)}
              fill={hex}
              stroke={LINE}
              strokeWidth={fmt(0.025 * p)}
              transform="rotate(-45)"
            />
          );
        });

        const body = (
          <g transform={`translate(${fmt(c.x)} ${fmt(c.y + dy)})`} data-cavity={c.cavity} data-empty={empty ? "true" : undefined}>
            <title>{cavityTitle}</title>
            {isHighlight ? (
              <rect
                x={fmt(-s / 2 - 0.09 * p)}
                y={fmt(-s / 2 - 0.09 * p)}
                width={fmt(s + 0.18 * p)}
                height={fmt(s + 0.18 * p)}
                rx={fmt(r + 0.09 * p)}
                fill="none"
                stroke={LINE}
                strokeWidth={fmt(0.1 * p)}
                data-highlight="true"
              />
            ) : null}
            <rect x={fmt(-s / 2)} y={fmt(-s / 2)} width={fmt(s)} height={fmt(s)} rx={fmt(r)} fill={fill} />
            {bands.length > 0 ? <g clipPath={`url(#${clipId})`}>{bands}</g> : null}
            <rect
              x={fmt(-s / 2)}
              y={fmt(-s / 2)}
              width={fmt(s)}
              height={fmt(s)}
              rx={fmt(r)}
              fill="none"
              stroke={empty ? MUTED : LINE}
              strokeWidth={fmt(stroke)}
              strokeDasharray={empty ? `${fmt(0.08 * p)} ${fmt(0.06 * p)}` : undefined}
            />
            {isPin1 ? (
              // A solid triangle centred over the cavity, pointing down at it: pin 1 found by shape, not by
              // colour, and never read as belonging to a neighbour when the face is mirrored.
              <path
                d={`M ${fmt(-0.16 * p)} ${fmt(-s / 2 - 0.24 * p)} h ${fmt(0.32 * p)} l ${fmt(-0.16 * p)} ${fmt(0.19 * p)} z`}
                fill={LINE}
                data-pin1="true"
              />
            ) : null}
            {full ? (
              <>
                <text
                  x="0"
                  y={fmt(labelFont * 0.36)}
                  fontSize={fmt(labelFont)}
                  fontWeight={isPin1 ? 800 : 600}
                  textDecoration={isPin1 ? "underline" : undefined}
                  textAnchor="middle"
                  fill={ink}
                  stroke={haloFor(ink)}
                  strokeWidth={fmt(0.045 * p)}
                  paintOrder="stroke"
                  strokeLinejoin="round"
                >
                  {c.cavity}
                </text>
                {!empty ? (
                  <text
                    x="0"
                    y={fmt(codeBaseline - dy)}
                    fontSize={fmt(Math.min(0.23 * p, (0.92 * p) / (0.56 * Math.max(pc.code!.length, 1))))}
                    fontWeight={600}
                    textAnchor="middle"
                    fill={LINE}
                    data-code="true"
                  >
                    {pc.code}
                  </text>
                ) : null}
              </>
            ) : null}
          </g>
        );

        return pc?.href ? (
          <a key={c.cavity} href={pc.href} aria-label={cavityTitle}>
            {body}
          </a>
        ) : (
          <g key={c.cavity}>{body}</g>
        );
      })}
    </svg>
  );
}
