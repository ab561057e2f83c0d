/**
 * Where two analysis results differ beyond the tolerances of issue 17's "same result" (the
 * windowed analysis against the in-memory one): counts, kinds, strings and list lengths exactly;
 * every dB figure within 0.01 dB; every other number within 1e-6 of itself or one unit of its
 * last printed decimal, whichever is larger (app/lib/signal/analyse-samples.test.ts says why).
 */
/** One unit of the last decimal x is printed with (0 for a whole number). */
function lastDecimal(x: number): number {
  const s = String(x);
  if (s.includes("e")) return 0;
  const d = s.split(".")[1]?.length ?? 0;
  return d === 0 ? 0 : 10 ** -d;
}

/** Where two results differ beyond the tolerances at the top (paths and values). */
export function differences(a: unknown, b: unknown, path = "", out: string[] = []): string[] {
  if (typeof a === "number" && typeof b === "number") {
    const dB = /db$/i.test(path.replace(/\[\d+\]$/, ""));
    const tol = dB ? 0.01 : Math.max(1e-6 * Math.abs(a), lastDecimal(a), lastDecimal(b));
    // (1 + 1e-9): a difference of one printed unit is that unit only up to rounding.
    if (!(Math.abs(a - b) <= tol * (1 + 1e-9)) && !(Number.isNaN(a) && Number.isNaN(b)))
      out.push(`${path}: ${a} vs ${b}`);
  } else if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) out.push(`${path}: ${a.length} items vs ${b.length}`);
    else a.forEach((x, i) => differences(x, b[i], `${path}[${i}]`, out));
  } else if (a && b && typeof a === "object" && typeof b === "object") {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys)
      differences(
        (a as Record<string, unknown>)[k],
        (b as Record<string, unknown>)[k],
        `${path}.${k}`,
        out,
      );
  } else if (a !== b) out.push(`${path}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`);
  return out;
}
