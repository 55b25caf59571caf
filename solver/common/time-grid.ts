/**
 * The output time grid of a curve: `points` equally spaced times over [0, mission] plus every
 * breakpoint inside the mission twice, first as a left limit (the value just before a test) and then as
 * the value from the breakpoint on, so that a sawtooth's drops are drawn as vertical edges.
 */
export function curveTimes(missionHours: number, points: number, breakpoints: Float64Array): { hours: Float64Array; fromLeft: Uint8Array } {
  if (!Number.isInteger(points) || points < 2) throw new RangeError(`a curve needs at least 2 time points (got ${points})`);
  const interior = [...breakpoints].filter((time) => time > 0 && time < missionHours);
  const breakSet = new Set(interior);
  const hours: number[] = [];
  const fromLeft: number[] = [];
  const uniform: number[] = [];
  for (let i = 0; i < points; i++) uniform.push(i === points - 1 ? missionHours : (missionHours * i) / (points - 1));
  let u = 0;
  let b = 0;
  while (u < uniform.length || b < interior.length) {
    const nextUniform = u < uniform.length ? uniform[u] : Infinity;
    const nextBreak = b < interior.length ? interior[b] : Infinity;
    if (nextBreak <= nextUniform) {
      hours.push(nextBreak, nextBreak);
      fromLeft.push(1, 0);
      b++;
      if (nextUniform === nextBreak) u++;
    } else {
      if (!breakSet.has(nextUniform)) {
        hours.push(nextUniform);
        fromLeft.push(0);
      }
      u++;
    }
  }
  return { hours: Float64Array.from(hours), fromLeft: Uint8Array.from(fromLeft) };
}
