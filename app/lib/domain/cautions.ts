/**
 * The usual cautions of the trade (docs/architecture.md §8), as data for the evidence report;
 * the pages show the same words (components/caution-note.tsx). Twistlog defers to local codes and
 * licensed practice.
 */
export const CAUTIONS: string[] = [
  "Road tests belong on a proving ground or closed course, driven by trained staff under local rules. Nobody operates Twistlog while driving.",
  "Speed-sensor wiring near the flywheel and shafts must be secured away from rotating parts.",
  "Replacing a damper or clutch is licensed workshop work. The verdicts in this report support an engineering decision; they do not replace local codes, the manufacturer's instructions or licensed practice.",
];
