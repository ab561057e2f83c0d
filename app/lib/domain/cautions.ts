/**
 * The usual cautions (docs/architecture.md §8), as data: one wording for the notes on the pages
 * (components/caution-note.tsx) and the evidence report's cautions page (report/). Where the work
 * can hurt someone — road tests, rotating parts, repeated engine starts, workshop repairs — the
 * product says so and defers to local codes and licensed practice (common practice of test
 * departments; no single written standard).
 */

/** Where road tests happen and who drives. */
export const ROAD_TEST_CAUTION =
  "Road tests belong on a proving ground or closed course, driven by trained staff under local rules.";

/** Nobody works the app at the wheel. */
export const NO_USE_WHILE_DRIVING =
  "Nobody operates Twistlog while driving: upload after the run, parked.";

/** The sensors sit next to the flywheel and the shafts. */
export const SENSOR_WIRING_CAUTION =
  "Secure the sensor wiring at the flywheel and shafts well clear of rotating parts.";

/** What a verdict is: one recording's screening result. */
export const VERDICT_SCOPE =
  "A rattle or resonance verdict is a screening aid computed from one recording: confirm it on the vehicle before acting on it.";

/** Who replaces dampers and clutches. */
export const WORKSHOP_CAUTION = "Damper and clutch replacement is licensed workshop work.";

/** The closing rule of every caution. */
export const LOCAL_CODES_FIRST = "Local codes and licensed practice come first.";

/** Repeated engine starts and stops on a vehicle. */
export const START_STOP_CAUTION =
  "Engine start and stop tests are run on a vehicle that is secured, in a closed area, by trained staff; a damper that reaches its end stops can be damaged, so confirm a figure on the vehicle before repeating the test.";

/** What a sign-off and its report are, and what they are not. */
export const REPORT_SCOPE =
  "This report records measurements, their analysis and the team's verdicts against its own targets. It is evidence for a release decision, not an instruction to drive, test or repair: the people who do that work follow the vehicle maker's procedures.";

/** A caution of the evidence report: a short title and its paragraph. */
export interface Caution {
  title: string;
  text: string;
}

/** The evidence report's cautions page, in order. */
export const REPORT_CAUTIONS: readonly Caution[] = [
  { title: "Road tests", text: `${ROAD_TEST_CAUTION} ${NO_USE_WHILE_DRIVING}` },
  { title: "Sensors and rotating parts", text: SENSOR_WIRING_CAUTION },
  { title: "Engine starts and stops", text: START_STOP_CAUTION },
  { title: "Verdicts", text: VERDICT_SCOPE },
  { title: "Workshop work", text: `${WORKSHOP_CAUTION} ${LOCAL_CODES_FIRST}` },
  { title: "This report", text: REPORT_SCOPE },
];

/** The paragraphs as ReportModel.cautions holds them (the data layer passes them on). */
export const CAUTIONS: string[] = REPORT_CAUTIONS.map((c) => c.text);
