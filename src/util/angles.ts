/** Wrap an angle into (-pi, pi]. */
export function wrapAngle(angle: number): number {
  const twoPi = 2 * Math.PI;
  let a = angle - twoPi * Math.floor((angle + Math.PI) / twoPi);
  if (a <= -Math.PI) a += twoPi;
  return a;
}
