// The cautions of docs/architecture.md §8, shown where a user uploads a drive log or reads a verdict.

const box =
  "rounded-md border border-amber-500 bg-amber-50 px-4 py-3 text-sm leading-relaxed text-amber-950";

/** Beside the upload: where road tests happen, who drives, and the sensor wiring. */
export function RoadTestCaution() {
  return (
    <aside aria-label="Safety on road tests" className={box}>
      <p className="font-semibold">Before you record a drive log</p>
      <ul className="mt-1 list-disc space-y-0.5 pl-5">
        <li>
          Road tests belong on a proving ground or closed course, driven by trained staff under
          local rules.
        </li>
        <li>Nobody operates Twistlog while driving: upload after the run, parked.</li>
        <li>Secure the sensor wiring at the flywheel and shafts well clear of rotating parts.</li>
      </ul>
    </aside>
  );
}

/** Beside a rattle or resonance verdict: what the verdict is and what it is not. */
export function VerdictCaution() {
  return (
    <aside aria-label="About these verdicts" className={box}>
      A rattle or resonance verdict is a screening aid computed from one recording: confirm it on
      the vehicle before acting on it. Damper and clutch replacement is licensed workshop work;
      local codes and licensed practice come first.
    </aside>
  );
}

/** Beside the starts and stops: repeated starts on a vehicle are road or workshop work. */
export function StartStopCaution() {
  return (
    <aside aria-label="About start and stop tests" className={box}>
      Engine start and stop tests are run on a vehicle that is secured, in a closed area, by trained
      staff; a damper that reaches its end stops can be damaged, so confirm a figure on the vehicle
      before repeating the test. Local codes and licensed practice come first.
    </aside>
  );
}
