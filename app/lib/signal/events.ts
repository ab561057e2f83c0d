/**
 * Engine starts and stops as events (issue 15; docs/signal-computation.md, "Transients"), from the
 * order filter's measurement of each start or stop span (transient.ts):
 * - resonanceRpm: the trend speed of the sample of least isolation 20·log10(|C|/|G|) among the
 *   samples where the firing order is resolved and the gearbox amplitude is above the noise;
 *   peakAmplificationDb is minus that isolation (positive = amplified);
 * - timeNearResonanceS: the time the trend speed spends within ±10 % of resonanceRpm;
 * - peakGearboxAngAccelRadS2: max |dω/dt| of the gearbox input, ω low-passed (zero-phase
 *   4th-order Butterworth at 2.5 × the firing frequency at the event's top speed, as the idle
 *   rattle check does at idle, so the firing order passes at every speed of the event and sensor
 *   noise does not) and differentiated by central differences;
 * - twistPeakToPeakDeg: max − min of the relative angle θ_rel (twist.ts, drift removed) in the event.
 * Times s, speeds rpm, accelerations rad/s², angles degrees.
 */
import { butterworthLowpass4, filtfilt } from "./lowpass.ts";
import { NOISE_MARGIN } from "./isolation.ts";
import type { TransientEvent } from "./result-schema.ts";
import type { SpanMeasure } from "./span-measure.ts";
import { peakToPeak, relativeTwistDeg, TWIST_DRIFT_CUTOFF_HZ } from "./twist.ts";

/** Half-width of the band around resonanceRpm counted as "near resonance", fraction. */
export const NEAR_RESONANCE = 0.1;

const r1 = (x: number) => Math.round(x * 10) / 10;
const r3 = (x: number) => Math.round(x * 1000) / 1000;

/** Events of one stretch of log (arrays of the stretch, its spans' measures). */
export function transientEvents(args: {
  timeS: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  sampleRateHz: number;
  order: number;
  measures: readonly SpanMeasure[];
}): TransientEvent[] {
  const out: TransientEvent[] = [];
  for (const m of args.measures) {
    const kind = m.span.kind;
    if (kind === "fast") continue;
    const res = leastIsolation(m);
    let near = 0;
    if (res)
      for (let j = 0; j < m.rpm.length; j++)
        if (Math.abs(m.rpm[j]! - res.rpm) <= NEAR_RESONANCE * res.rpm) near += m.stride;
    out.push({
      kind,
      startS: r3(m.span.startS),
      endS: r3(m.span.endS),
      resonanceRpm: res ? r1(res.rpm) : null,
      peakAmplificationDb: res ? Math.round(-res.dB * 100) / 100 : null,
      timeNearResonanceS: res ? r3(near / args.sampleRateHz) : null,
      peakGearboxAngAccelRadS2: r1(peakAngAccel(args, m)),
      twistPeakToPeakDeg: r3(eventTwist(args, m)),
    });
  }
  return out;
}

function leastIsolation(m: SpanMeasure): { rpm: number; dB: number } | null {
  let best: { rpm: number; dB: number } | null = null;
  for (let j = 0; j < m.rpm.length; j++) {
    if (m.unresolved[j]) continue;
    const g = Math.hypot(m.gRe[j]!, m.gIm[j]!);
    const c = Math.hypot(m.cRe[j]!, m.cIm[j]!);
    if (!(g >= NOISE_MARGIN * m.noiseRadS[j]!) || !(c > 0)) continue;
    const dB = 20 * Math.log10(c / g);
    if (!best || dB < best.dB) best = { rpm: m.rpm[j]!, dB };
  }
  return best;
}

/** Largest |dω/dt| of the low-passed gearbox speed inside the span (method at the top). */
function peakAngAccel(
  args: { timeS: Float64Array; gearboxRadS: Float64Array; sampleRateHz: number; order: number },
  m: SpanMeasure,
): number {
  const fs = args.sampleRateHz;
  const n = args.timeS.length;
  let top = 0;
  for (let j = 0; j < m.rpm.length; j++) top = Math.max(top, m.rpm[j]!);
  const firingHz = Math.max(1, (args.order * top) / 60);
  const cutoff = 2.5 * firingHz;
  const pad = Math.ceil(0.5 * fs);
  const a = Math.max(0, m.span.startIndex - pad);
  const b = Math.min(n, m.span.endIndex + pad);
  const x = args.gearboxRadS.subarray(a, b);
  const y = cutoff < 0.45 * fs ? filtfilt(x, butterworthLowpass4(cutoff, fs)) : x;
  const t = args.timeS.subarray(a, b);
  // One firing period at the log's own ends is the filter's start-up: skipped.
  const guard = Math.ceil(fs / firingHz);
  const from = Math.max(m.span.startIndex - a, a === 0 ? guard : 1);
  const to = Math.min(m.span.endIndex - a, b === n ? y.length - guard : y.length - 1);
  let peak = 0;
  for (let i = from; i < to; i++)
    peak = Math.max(peak, Math.abs((y[i + 1]! - y[i - 1]!) / (t[i + 1]! - t[i - 1]!)));
  return peak;
}

/** Peak-to-peak θ_rel in the span; the drift high-pass runs over the span ± 4 of its periods. */
function eventTwist(
  args: {
    timeS: Float64Array;
    crankRadS: Float64Array;
    gearboxRadS: Float64Array;
    sampleRateHz: number;
  },
  m: SpanMeasure,
): number {
  const n = args.timeS.length;
  const pad = Math.ceil((4 / TWIST_DRIFT_CUTOFF_HZ) * args.sampleRateHz);
  const a = Math.max(0, m.span.startIndex - pad);
  const b = Math.min(n, m.span.endIndex + pad);
  const theta = relativeTwistDeg({
    timeS: args.timeS.subarray(a, b),
    crankRadS: args.crankRadS.subarray(a, b),
    gearboxRadS: args.gearboxRadS.subarray(a, b),
    sampleRateHz: args.sampleRateHz,
    driftCutoffHz: TWIST_DRIFT_CUTOFF_HZ,
  });
  return peakToPeak(theta, m.span.startIndex - a, m.span.endIndex - a);
}
