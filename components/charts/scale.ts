/** A linear map from data to pixels, with "nice" tick values (1, 2, 2.5 or 5 × 10ⁿ) for axes. */
export function linearScale(domain: [number, number], range: [number, number]) {
  const [d0, d1] = domain[0] === domain[1] ? [domain[0] - 1, domain[1] + 1] : domain;
  const [r0, r1] = range;
  return (value: number) => r0 + ((value - d0) / (d1 - d0)) * (r1 - r0);
}

export function niceTicks(min: number, max: number, count = 5): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (min === max) return [min];
  const raw = (max - min) / Math.max(1, count - 1);
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const step = ([1, 2, 2.5, 5, 10].find((m) => m * magnitude >= raw) ?? 10) * magnitude;
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step)
    ticks.push(Math.abs(v) < step * 1e-9 ? 0 : Number(v.toPrecision(12)));
  return ticks;
}

/** A domain widened to whole tick steps around the values, including zero when asked (the no-response line). */
export function niceDomain(values: number[], includeZero = true): { domain: [number, number]; ticks: number[] } {
  const finite = values.filter(Number.isFinite);
  let lo = Math.min(...(includeZero ? [0] : []), ...finite);
  let hi = Math.max(...(includeZero ? [0] : []), ...finite);
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return { domain: [0, 1], ticks: [0, 1] };
  if (lo === hi) [lo, hi] = [lo - 1, hi + 1];
  const rough = niceTicks(lo, hi);
  const step = rough.length > 1 ? rough[1]! - rough[0]! : 1;
  const start = Math.floor(lo / step) * step;
  const end = Math.ceil(hi / step) * step;
  return { domain: [start, end], ticks: niceTicks(start, end, Math.round((end - start) / step) + 1) };
}
