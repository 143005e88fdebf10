/**
 * Estimates a series' nominal sampling interval (s) as the median of the positive time steps among the first
 * `limit` records of the first platform seen. NaN when fewer than two usable steps. Cost O(limit·log limit).
 * Used when a deployment does not state its interval, so that the gap test can run.
 */
export function inferInterval(time: Float64Array, platform: Int32Array | null = null, limit = 2000): number {
  const steps: number[] = [];
  const p0 = platform ? platform[0] : 0;
  let last = NaN;
  for (let i = 0; i < time.length && steps.length < limit; i++) {
    if (platform && platform[i] !== p0) continue;
    const t = time[i]!;
    if (!Number.isFinite(t)) continue;
    if (last === last && t > last) steps.push(t - last);
    last = t;
  }
  if (steps.length < 2) return NaN;
  steps.sort((a, b) => a - b);
  return steps[Math.floor(steps.length / 2)]!;
}
