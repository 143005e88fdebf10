/**
 * The plot window around a flagged stretch: the stretch with half its length again on each side, at least
 * 30 minutes, so the flagged values are seen against the data around them. Used by the review page's and the QC
 * report's links into the plots, so both open the same window.
 */
export function aroundStretch(from: string, to: string): { from: string; to: string } {
  const a = Date.parse(from);
  const b = Date.parse(to);
  const pad = Math.max((b - a) * 0.5, 30 * 60_000);
  return { from: new Date(a - pad).toISOString(), to: new Date(b + pad).toISOString() };
}
