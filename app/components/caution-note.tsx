// The cautions of docs/architecture.md §8, shown where a user uploads a drive log or reads a verdict.
// The wording lives in lib/domain/cautions.ts, shared with the evidence report.
import {
  LOCAL_CODES_FIRST,
  NO_USE_WHILE_DRIVING,
  ROAD_TEST_CAUTION,
  SENSOR_WIRING_CAUTION,
  START_STOP_CAUTION,
  VERDICT_SCOPE,
  WORKSHOP_CAUTION,
} from "~/lib/domain/cautions";

const box =
  "rounded-md border border-amber-500 bg-amber-50 px-4 py-3 text-sm leading-relaxed text-amber-950";

/** Beside the upload: where road tests happen, who drives, and the sensor wiring. */
export function RoadTestCaution() {
  return (
    <aside aria-label="Safety on road tests" className={box}>
      <p className="font-semibold">Before you record a drive log</p>
      <ul className="mt-1 list-disc space-y-0.5 pl-5">
        <li>{ROAD_TEST_CAUTION}</li>
        <li>{NO_USE_WHILE_DRIVING}</li>
        <li>{SENSOR_WIRING_CAUTION}</li>
      </ul>
    </aside>
  );
}

/** Beside a rattle or resonance verdict: what the verdict is and what it is not. */
export function VerdictCaution() {
  return (
    <aside aria-label="About these verdicts" className={box}>
      {VERDICT_SCOPE} {WORKSHOP_CAUTION} {LOCAL_CODES_FIRST}
    </aside>
  );
}

/** Beside the starts and stops: repeated starts on a vehicle are road or workshop work. */
export function StartStopCaution() {
  return (
    <aside aria-label="About start and stop tests" className={box}>
      {START_STOP_CAUTION} {LOCAL_CODES_FIRST}
    </aside>
  );
}
