/** Wire colours as typed in one box: one per line, or separated by commas or semicolons (the finder page and its API). */
export const splitWires = (raw: string): string[] =>
  raw
    .split(/[\n,;]+/)
    .map((w) => w.trim())
    .filter(Boolean);
