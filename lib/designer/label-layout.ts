/**
 * Vertical placement of point labels in a chart so neighbouring labels do
 * not overlap: each label keeps its point's y unless it would sit closer
 * than `minGap` to the label above, then it moves down; labels pushed past
 * `bottom` are moved back up as a block. Coordinates are SVG user units
 * (y grows downwards). Returns the label y per input, in input order.
 */
export function spreadLabels(
  ys: readonly number[],
  { minGap, top = -Infinity, bottom = Infinity }: { minGap: number; top?: number; bottom?: number },
): number[] {
  if (!(minGap >= 0)) throw new RangeError(`spreadLabels: minGap must be ≥ 0, got ${minGap}`);
  const order = ys.map((y, i) => ({ y, i })).sort((a, b) => a.y - b.y || a.i - b.i);
  const placed = order.map((o) => Math.min(Math.max(o.y, top), bottom));
  for (let k = 1; k < placed.length; k++) placed[k] = Math.max(placed[k], placed[k - 1] + minGap);
  // pushed below the plot: move back up from the bottom, keeping the gaps
  if (placed.length && placed[placed.length - 1] > bottom) {
    placed[placed.length - 1] = bottom;
    for (let k = placed.length - 2; k >= 0; k--) placed[k] = Math.min(placed[k], placed[k + 1] - minGap);
  }
  const out = new Array<number>(ys.length);
  order.forEach((o, k) => {
    out[o.i] = placed[k];
  });
  return out;
}
