import { countText } from "../base/plural";
import { percentText, radS2Text, rpmText, secondsText } from "./format";
import type { AnalysisResult } from "../signal/result-schema";

type Idle = NonNullable<AnalysisResult["idle"]>;

export interface RattleReading {
  verdict: Idle["verdict"];
  headline: string;
  sentences: string[];
  /** Time above the limit, s, and its share of the idle time examined, %. */
  overS: number;
  overPercent: number;
}

/**
 * The rattle check in plain words, from the stored idle result only (no re-computation). The
 * verdict rule is the signal core's (rattle.ts): over the limit when the firing-order amplitude
 * α = Δω·q·Ω or the time-domain peak exceeds it.
 */
export function rattleReading(idle: Idle): RattleReading {
  const limit = idle.limitRadS2;
  const order = idle.gearboxAngAccelRadS2;
  const peak = idle.gearboxAngAccelPeakRadS2;
  const overS = idle.spans.reduce((s, x) => s + x.durationS, 0);
  const overPercent = idle.idleDurationS > 0 ? (100 * overS) / idle.idleDurationS : 0;
  const rel = (v: number) =>
    v > limit ? `${percentText(v / limit - 1)} above` : `${percentText(1 - v / limit)} below`;
  const sentences = [
    `At a mean idle speed of ${rpmText(idle.meanRpm)}, the gearbox input's angular acceleration at the firing order is ${radS2Text(order)}, ${rel(order)} the ${radS2Text(limit)} limit.`,
    `Its highest momentary value is ${radS2Text(peak)} (${rel(peak)} the limit).`,
  ];
  if (idle.spans.length)
    sentences.push(
      `It stays above the limit in ${countText(idle.spans.length, "span")}, ${secondsText(overS)} in all, ${percentText(overPercent / 100)} of the ${secondsText(idle.idleDurationS)} of idle examined.`,
    );
  const headline =
    idle.verdict === "over-limit"
      ? "Gear rattle at idle is likely: the gearbox input is shaken harder than the limit allows."
      : "Gear rattle at idle is unlikely from the firing order in this drive log.";
  return { verdict: idle.verdict, headline, sentences, overS, overPercent };
}
