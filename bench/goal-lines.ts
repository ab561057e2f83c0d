/**
 * One format for the goal lines every bench prints (the performance issue's goals 1–5), so
 * `npm run bench` (bench/run.ts) can gather them into one table at the end:
 *   GOAL <n> | <what> | <figure> <unit> | reference <ref> <unit> | ratio <r> (goal <target>)
 * A bench with no reference figure prints the goal value as the reference.
 */
export function ratioLine(
  goal: string,
  what: string,
  figure: number,
  unit: string,
  reference: number | null,
  target: string,
): void {
  const f = (x: number) => (Math.abs(x) >= 100 ? x.toFixed(0) : x.toPrecision(3));
  const ref = reference === null ? "none" : `${f(reference)} ${unit}`;
  const ratio = reference === null || !(reference > 0) ? "—" : (figure / reference).toFixed(2);
  console.log(
    `GOAL ${goal} | ${what} | ${Number.isFinite(figure) ? f(figure) : "n/a"} ${unit} | reference ${ref} | ratio ${ratio} (goal ${target})`,
  );
}

/** A goal line for a bench part that could not run here (python3 or numpy missing …). */
export function skippedLine(goal: string, what: string, why: string): void {
  console.log(`GOAL ${goal} | ${what} | skipped: ${why}`);
}
