// The overlay curves of GET …/curves.json (vehicle page, comparisons), shared by the server
// that builds them (lib/data/curves.server.ts) and the charts that draw them.

/** One drive log in an overlay (comparison, vehicle page), from GET …/curves.json. */
export interface CurveSet {
  logId: number;
  label: string;
  /** Isolation at the firing order, dB, against engine speed, rpm. */
  isolation: { rpm: number[]; dB: number[] };
  /** Firing-order amplitude, rpm (0-peak), both sides, against engine speed, rpm. */
  firingOrder: { rpm: number[]; crankRpm: number[]; gearboxRpm: number[] };
  firingOrderValue: number;
}

export interface CurvesResponse {
  vehicleId: number;
  curves: CurveSet[];
}
