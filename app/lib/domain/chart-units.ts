/**
 * Unit conversions for the charts (pure, shared with the server). The chart data (chart-data.ts)
 * keeps engine speed and 0-peak angular-velocity amplitudes in rpm; the charts may show an
 * amplitude in rpm, rad/s or as the angular-acceleration amplitude in rad/s².
 *
 * 1 rpm = 1 rev/min = 2π rad / 60 s (SI Brochure, 9th ed., the radian and the minute).
 * For ω(t) = Ω + Δω·sin(q·Ω·t) — order q of a fluctuation Δω about the mean speed Ω — the
 * angular acceleration is dω/dt = Δω·q·Ω·cos(q·Ω·t), so its amplitude is α = Δω·q·Ω (rad/s²
 * with Δω and Ω in rad/s; docs/architecture.md §4).
 */

export type AmplitudeUnit = "rpm" | "rad/s" | "rad/s²";
/** Speed fluctuations against time (no order): angular velocity only. */
export type SpeedUnit = "rpm" | "rad/s";

export const AMPLITUDE_UNITS: readonly AmplitudeUnit[] = ["rpm", "rad/s", "rad/s²"];
export const SPEED_UNITS: readonly SpeedUnit[] = ["rpm", "rad/s"];

/** rad/s per rpm: 2π/60. */
export const RAD_S_PER_RPM = (2 * Math.PI) / 60;

export function rpmToRadS(rpm: number): number {
  return rpm * RAD_S_PER_RPM;
}

export function radSToRpm(radS: number): number {
  return radS / RAD_S_PER_RPM;
}

/**
 * Angular-acceleration amplitude α = Δω·q·Ω, rad/s², of an order-q fluctuation with 0-peak
 * amplitude `amplitudeRpm` at the mean engine speed `engineRpm` (both rpm).
 */
export function angularAccelerationRadS2(
  amplitudeRpm: number,
  order: number,
  engineRpm: number,
): number {
  return rpmToRadS(amplitudeRpm) * order * rpmToRadS(engineRpm);
}

/** An order's 0-peak amplitude (rpm) at engine speed `engineRpm` (rpm), in `unit`. */
export function convertAmplitude(
  amplitudeRpm: number,
  unit: AmplitudeUnit,
  order: number,
  engineRpm: number,
): number {
  if (unit === "rpm") return amplitudeRpm;
  if (unit === "rad/s") return rpmToRadS(amplitudeRpm);
  return angularAccelerationRadS2(amplitudeRpm, order, engineRpm);
}

/** A speed or speed fluctuation given in rpm, in `unit`. */
export function convertSpeed(rpm: number, unit: SpeedUnit): number {
  return unit === "rpm" ? rpm : rpmToRadS(rpm);
}

/** The quantity an amplitude axis shows in each unit. */
export function amplitudeAxisLabel(unit: AmplitudeUnit): string {
  return unit === "rad/s²" ? "Angular acceleration amplitude, rad/s²" : `Amplitude, ${unit}`;
}

/** Reference of the order maps' level scale: 1 rpm (0-peak). */
export const DB_REFERENCE_RPM = 1;

/** Level of an amplitude in dB re 1 rpm: 20·log10(A / 1 rpm); −Infinity for 0. */
export function amplitudeDb(amplitudeRpm: number): number {
  return 20 * Math.log10(amplitudeRpm / DB_REFERENCE_RPM);
}
