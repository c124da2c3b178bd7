import { FaceView } from "~/components/face-view";
import { faceGeometry, type FaceGeometry, type HousingLayout } from "~/domain/connector-face";
import { facePaint } from "~/domain/face-paint";
import type { ProposedPin, RowChange } from "~/domain/submissions";
import { MARKS, type Notation } from "./marks";

/** The same marks drawn on the face views: ring colour and dash pattern (in pitch units). */
const FACE_MARK: Readonly<Record<Exclude<RowChange, "same">, { stroke: string; dash: [number, number] | null }>> = Object.freeze({
  added: { stroke: "#0369a1", dash: null },
  removed: { stroke: "#57534e", dash: [0.12, 0.08] },
  changed: { stroke: "#8a6a04", dash: [0.04, 0.06] },
});

const LATCH_WORDS = { top: "latch at the top", bottom: "latch at the bottom", left: "latch on the left", right: "latch on the right" } as const;

function layoutWords(l: HousingLayout): string {
  return `${l.rows}×${l.cols} grid, ${l.cavities.length} ${l.cavities.length === 1 ? "cavity" : "cavities"}, pin 1 is cavity ${l.pin1}, ${LATCH_WORDS[l.latch]}`;
}

/**
 * Change rings over a FaceView, one per marked cavity. FaceView takes a single `highlight`; this overlay frames its
 * drawing the same way (same viewBox and sizing as face-view.tsx draws a full-size face) so several cavities can be
 * marked at once. Hidden from assistive technology: the same list is given in words under the drawing.
 */
function FaceMarks({ geometry: g, marks }: { geometry: FaceGeometry; marks: ReadonlyMap<string, Exclude<RowChange, "same">> }) {
  const p = g.pitch;
  const tab = 0.95 * p;
  const edge = 0.15 * p;
  const [left, right, top, bottom] = [
    g.latch === "left" ? tab : edge,
    g.latch === "right" ? tab : edge,
    g.latch === "top" ? tab : edge,
    g.latch === "bottom" ? tab : edge,
  ];
  const vb = [-g.width / 2 - left, -g.height / 2 - top, g.width + left + right, g.height + top + bottom];
  const fmt = (n: number) => String(Math.round(n * 1000) / 1000);
  const s = 0.52 * p; // cavity square of a full-size face
  const dy = -0.13 * p; // cavity sits in the upper part of its cell
  const half = s / 2 + 0.13 * p;
  return (
    <svg
      xmlns="http://www.w3.org/2000/svg"
      viewBox={vb.map(fmt).join(" ")}
      width="100%"
      aria-hidden="true"
      focusable="false"
      className="pointer-events-none absolute top-0 left-0 block"
      style={{ maxWidth: `min(100%, ${Math.round(vb[2] * 7)}px)`, height: "auto" }}
    >
      {g.cavities
        .filter((c) => marks.has(c.cavity))
        .map((c) => {
          const kind = marks.get(c.cavity)!;
          const m = FACE_MARK[kind];
          return (
            <g key={c.cavity} transform={`translate(${fmt(c.x)} ${fmt(c.y + dy)})`} data-face-mark={kind} data-cavity={c.cavity}>
              <rect
                x={fmt(-half)}
                y={fmt(-half)}
                width={fmt(2 * half)}
                height={fmt(2 * half)}
                rx={fmt(0.16 * s + 0.13 * p)}
                fill="none"
                stroke={m.stroke}
                strokeWidth={fmt(0.08 * p)}
                strokeDasharray={m.dash ? m.dash.map((d) => fmt(d * p)).join(" ") : undefined}
              />
              <circle cx={fmt(half)} cy={fmt(-half)} r={fmt(0.13 * p)} fill="#ffffff" stroke="#1b1b1b" strokeWidth={fmt(0.03 * p)} />
              <text x={fmt(half)} y={fmt(-half + 0.075 * p)} fontSize={fmt(0.2 * p)} fontWeight={800} textAnchor="middle" fill="#1b1b1b">
                {MARKS[kind].symbol}
              </text>
            </g>
          );
        })}
    </svg>
  );
}

export function FacePanel(props: {
  label: string;
  cardName: string;
  layout: HousingLayout;
  pins: readonly ProposedPin[];
  notation: Notation;
  marks: Map<string, Exclude<RowChange, "same">>;
  idFor: (cavity: string) => string;
}) {
  const { label, cardName, layout, pins, notation, marks, idFor } = props;
  const geometry = faceGeometry(layout);
  const inLayout = new Set(layout.cavities.map((c) => c.cavity));
  const listed = [...marks].filter(([cavity]) => inLayout.has(cavity));
  const paint = facePaint(pins, notation.system, notation.houseStyle).map((pc) => ({ ...pc, href: `#${encodeURIComponent(idFor(pc.cavity))}` }));
  return (
    <figure className="print-avoid-break min-w-0 rounded-md border border-rule bg-white p-2" data-face={label.toLowerCase()}>
      <figcaption className="mb-1 font-bold">{label}</figcaption>
      <div className="relative">
        <FaceView geometry={geometry} paint={paint} className="block" caption={`${label} mating face of ${cardName || "this card"}`} />
        {listed.length > 0 ? <FaceMarks geometry={geometry} marks={marks} /> : null}
      </div>
      <p className="mt-1 text-sm print:text-[8pt]">{layoutWords(layout)}.</p>
      <p className="mt-1 text-sm print:text-[8pt]" data-face-marks={listed.length}>
        {listed.length === 0 ? (
          "No cavity marked here."
        ) : (
          <>
            Marked here:{" "}
            {listed.map(([cavity, kind], i) => (
              <span key={cavity}>
                {i > 0 ? "; " : ""}cavity <span className="font-semibold">{cavity}</span> ({MARKS[kind].symbol} {MARKS[kind].word})
              </span>
            ))}
          </>
        )}
      </p>
    </figure>
  );
}
