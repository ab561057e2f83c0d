/**
 * An analytic drive log as CSV text for the repair and section tests (never the demo samples):
 * a steady crank speed with a sine ripple at the firing order and the gearbox input with the
 * same ripple, smaller. Known amplitudes, so the isolation is known by its definition
 * 20·log10(crank / gearbox amplitude) (docs/signal-computation.md, step 9).
 */
export const RIPPLE = {
  fs: 2000,
  rpm: 3000,
  order: 2,
  crankAmpRpm: 30,
  gearboxAmpRpm: 3,
  header: "time [s],crank speed [rpm],gearbox input speed [rpm]",
} as const;

/** Deterministic uniform numbers in [−0.5, 0.5) (a linear congruential generator). */
function lcg(seed: number) {
  let s = seed;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32 - 0.5;
  };
}

/**
 * The log, `seconds` long at RIPPLE.fs. `jitter` moves every timestamp by up to ±jitter/2 of
 * the interval (so intervals differ by up to ±jitter), the speeds taken at the moved time;
 * `edit(i, line)` may change or drop (null) data line i (file row i + 2, the header is row 1).
 */
export function rippleCsv(
  seconds: number,
  o: { jitter?: number; edit?: (i: number, line: string) => string | null } = {},
): string {
  const { fs, rpm, order, crankAmpRpm, gearboxAmpRpm } = RIPPLE;
  const rnd = lcg(7);
  const lines: string[] = [RIPPLE.header];
  const w = (2 * Math.PI * rpm) / 60; // rad/s
  for (let i = 0; i < seconds * fs; i++) {
    const t = (i + (o.jitter ?? 0) * rnd()) / fs;
    const ripple = Math.cos(order * w * t);
    const line = `${t.toFixed(7)},${(rpm + crankAmpRpm * ripple).toFixed(4)},${(rpm + gearboxAmpRpm * ripple).toFixed(4)}`;
    const edited = o.edit ? o.edit(i, line) : line;
    if (edited !== null) lines.push(edited);
  }
  return `${lines.join("\n")}\n`;
}
