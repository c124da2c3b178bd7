/** A wire colour shown as a small swatch (base plus tracer bands) beside its code and words: never colour alone. */
export function ColourChip({ baseHex, tracerHexes, code, words }: { baseHex: string | null; tracerHexes: string[]; code?: string | null; words?: string }) {
  return (
    <span className="inline-flex items-center gap-2 align-middle">
      <svg width="30" height="14" viewBox="0 0 30 14" aria-hidden="true" className="shrink-0">
        <rect x="0.5" y="0.5" width="29" height="13" rx="6.5" fill={baseHex ?? "none"} stroke="#1d2327" strokeDasharray={baseHex ? undefined : "2 2"} />
        {tracerHexes.map((t, i) => (
          <rect key={i} x={11 + i * 6} y="1" width="4" height="12" fill={t} stroke="#1d2327" strokeWidth="0.5" />
        ))}
      </svg>
      {code ? <code className="font-semibold">{code}</code> : null}
      {words ? <span className="text-muted">{words}</span> : null}
    </span>
  );
}
