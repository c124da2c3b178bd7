/**
 * A circuit as a loop: supply points along the top from the battery, the load(s) at the right, the return
 * along the bottom back to the battery's negative post. Numbered probe points; every point labelled in words.
 */
export interface DrawnPoint {
  step: number;
  label: string;
  side: "supply" | "return";
  code: string | null;
  baseHex: string | null;
  tracerHex: string | null;
  expectWords: string;
  after: number | null;
  before: number | null;
}

/** How many points lie between a point and the battery along its own path (branches of a parallel feed share a depth). */
function depths(points: DrawnPoint[], link: "after" | "before") {
  const by = new Map(points.map((p) => [p.step, p]));
  const memo = new Map<number, number>();
  const depth = (p: DrawnPoint, guard = 0): number => {
    if (memo.has(p.step)) return memo.get(p.step)!;
    const next = p[link] !== null ? by.get(p[link]!) : undefined;
    const d = next && guard < points.length ? depth(next, guard + 1) + 1 : 0;
    memo.set(p.step, d);
    return d;
  };
  return (p: DrawnPoint) => depth(p);
}

export function CircuitDrawing({ points, loads, powered, highlight = [] }: { points: DrawnPoint[]; loads: string[]; powered: boolean; highlight?: number[] }) {
  // Supply: from the battery outwards; return: the battery − at the far left, so current runs round the loop.
  const fromPlus = depths(points, "after");
  const toMinus = depths(points, "before");
  const top = points.filter((p) => p.side === "supply").sort((a, b) => fromPlus(a) - fromPlus(b) || a.step - b.step);
  const bottom = points.filter((p) => p.side === "return").sort((a, b) => toMinus(a) - toMinus(b) || a.step - b.step);
  const cols = Math.max(top.length, bottom.length, 2);
  const gap = 74;
  const left = 70;
  const width = left + cols * gap + 90;
  const yTop = 46;
  const yBot = 176;
  const height = 232;
  const x = (i: number, n: number) => left + (i + 0.5) * ((cols * gap) / Math.max(n, 1));
  const loadX = left + cols * gap + 40;
  const dot = (p: DrawnPoint, cx: number, cy: number, labelBelow: boolean) => {
    const hot = highlight.includes(p.step);
    return (
      <g key={p.step} data-step={p.step}>
        <title>{`Step ${p.step}: ${p.label}${p.code ? ` (${p.code})` : ""} — expect ${p.expectWords}`}</title>
        <circle cx={cx} cy={cy} r={hot ? 15 : 13} fill={p.baseHex ?? "#ffffff"} stroke="#1d2327" strokeWidth={hot ? 4 : 2} />
        {p.tracerHex ? <rect x={cx - 3} y={cy - 12} width={6} height={24} fill={p.tracerHex} stroke="#1d2327" strokeWidth={0.8} /> : null}
        <circle cx={cx} cy={cy} r={8.5} fill="#ffffff" stroke="#1d2327" strokeWidth={1} />
        <text x={cx} y={cy + 4} textAnchor="middle" fontSize={11} fontWeight={700} fill="#1d2327">
          {p.step}
        </text>
        <text x={cx} y={labelBelow ? cy + 30 : cy - 20} textAnchor="middle" fontSize={10} fill="#1d2327">
          {p.code ?? ""}
        </text>
      </g>
    );
  };
  return (
    <svg
      viewBox={`0 0 ${width} ${height}`}
      width="100%"
      role="img"
      aria-label={`Circuit drawing with ${points.length} numbered probe points`}
      className="max-w-full"
      style={{ height: "auto" }}
    >
      <title>{`Circuit drawing: ${points.length} probe points, load: ${loads.join("; ")}`}</title>
      {/* The loop itself */}
      <path d={`M ${left - 30} ${yTop} H ${loadX} M ${loadX} ${yBot} H ${left - 30} V ${yTop}`} fill="none" stroke="#1d2327" strokeWidth={2.5} />
      <line x1={loadX} y1={yTop} x2={loadX} y2={yBot} stroke="#1d2327" strokeWidth={2.5} strokeDasharray="5 4" />
      {/* Battery (or the meter's reference for a passive loop) on the left */}
      {powered ? (
        <g aria-hidden="true">
          <rect x={left - 52} y={(yTop + yBot) / 2 - 26} width={44} height={52} rx={4} fill="#f7f5f0" stroke="#1d2327" strokeWidth={2} />
          <text x={left - 30} y={(yTop + yBot) / 2 - 8} textAnchor="middle" fontSize={16} fontWeight={700}>
            +
          </text>
          <text x={left - 30} y={(yTop + yBot) / 2 + 18} textAnchor="middle" fontSize={18} fontWeight={700}>
            −
          </text>
        </g>
      ) : (
        <g aria-hidden="true">
          <circle cx={left - 30} cy={(yTop + yBot) / 2} r={20} fill="#f7f5f0" stroke="#1d2327" strokeWidth={2} />
          <text x={left - 30} y={(yTop + yBot) / 2 + 5} textAnchor="middle" fontSize={14} fontWeight={700}>
            Ω
          </text>
        </g>
      )}
      {/* Load(s) on the right */}
      <g>
        <rect x={loadX - 34} y={(yTop + yBot) / 2 - 22} width={68} height={44} rx={6} fill="#fff1c2" stroke="#1d2327" strokeWidth={2} />
        <text x={loadX} y={(yTop + yBot) / 2 + 4} textAnchor="middle" fontSize={11} fontWeight={700}>
          {loads.length > 1 ? `${loads.length} loads` : "load"}
        </text>
      </g>

      {top.map((p, i) => dot(p, x(i, top.length), yTop, false))}
      {bottom.map((p, i) => dot(p, x(i, bottom.length), yBot, true))}
    </svg>
  );
}
