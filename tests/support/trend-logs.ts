/**
 * Drive logs for the damper-health trend (issue 15): full-load run-ups of a known two-mass damper
 * whose natural frequency changes from log to log, written as CSV and uploaded through API v1.
 * The crank carries an order-2 fluctuation of 10 rpm 0-peak on a linear sweep; the gearbox input
 * carries it shaped by the base-excited two-mass transfer function (transferH in
 * ./analytic-log.ts: Harris' Shock and Vibration Handbook ch. 30; Ogata, System Dynamics,
 * eq. 9-14), computed here independently of the app. Shared by the trend API test and the
 * browser test of the vehicle page's trend card.
 */
import { transferH } from "./analytic-log";

export interface TrendRunUp {
  /** The damper's natural frequency (least isolation), Hz. */
  fnHz: number;
  zeta?: number;
  /** yyyy-mm-dd */
  testDate: string;
  damperVariant?: string;
}

/** The sweep every trend log uses: 4-cylinder four-stroke (order 2), 700 → 3000 rpm in 40 s. */
export const TREND_SWEEP = {
  order: 2,
  fromRpm: 700,
  toRpm: 3000,
  durationS: 40,
  sampleRateHz: 1000,
  crankAmpRpm: 10,
  zeta: 0.15,
} as const;

/** The run-up as CSV text (time s, crank and gearbox speeds rpm). */
export function trendRunUpCsv(p: Pick<TrendRunUp, "fnHz" | "zeta">): string {
  const s = TREND_SWEEP;
  const zeta = p.zeta ?? s.zeta;
  const n = Math.round(s.durationS * s.sampleRateHz);
  const rpmAt = (t: number) => s.fromRpm + ((s.toRpm - s.fromRpm) * t) / s.durationS;
  const lines = ["time [s],crank speed [rpm],gearbox input speed [rpm]"];
  let revs = 0; // shaft angle in revolutions, by the trapezoidal rule
  for (let i = 0; i < n; i++) {
    const t = i / s.sampleRateHz;
    if (i > 0) revs += (rpmAt(t - 1 / s.sampleRateHz) + rpmAt(t)) / 2 / 60 / s.sampleRateHz;
    const rpm = rpmAt(t);
    const h = transferH(((rpm / 60) * s.order) / p.fnHz, zeta);
    const phase = 2 * Math.PI * s.order * revs;
    const crank = rpm + s.crankAmpRpm * Math.cos(phase);
    const gearbox = rpm + s.crankAmpRpm * h.magnitude * Math.cos(phase + h.phaseRad);
    lines.push(`${t.toFixed(4)},${crank.toFixed(4)},${gearbox.toFixed(4)}`);
  }
  return lines.join("\n") + "\n";
}

/** An authenticated fetch of the app: the path (e.g. "/api/v1/…") and the request. */
export type ApiFetch = (path: string, init?: RequestInit) => Promise<Response>;

/** ApiFetch with a personal API token. */
export function bearerFetch(baseUrl: string, token: string): ApiFetch {
  return (path, init = {}) =>
    fetch(baseUrl + path, {
      ...init,
      headers: { Authorization: `Bearer ${token}`, ...(init.headers ?? {}) },
    });
}

/**
 * Uploads one run-up per entry (condition run-up, gear 3, the entry's test date and damper
 * variant) to the vehicle, in order, and waits until every analysis is done; returns the drive
 * log ids. The vehicle must be a four-stroke four-cylinder (order 2). Throws when an upload is
 * refused or an analysis fails or does not finish within about two minutes.
 */
export async function uploadTrendLogs(
  api: ApiFetch,
  vehicleId: number,
  logs: readonly TrendRunUp[],
): Promise<number[]> {
  const ids: number[] = [];
  for (const [i, log] of logs.entries()) {
    const form = new FormData();
    form.set("condition", "run-up");
    form.set("gear", "3");
    form.set("testDate", log.testDate);
    if (log.damperVariant) form.set("damperVariant", log.damperVariant);
    const csv = trendRunUpCsv(log);
    form.set("file", new Blob([csv], { type: "text/csv" }), `trend-run-up-${i + 1}.csv`);
    const r = await api(`/api/v1/vehicles/${vehicleId}/logs`, { method: "POST", body: form });
    if (r.status !== 202) throw new Error(`upload ${i + 1}: ${r.status} ${await r.text()}`);
    ids.push(((await r.json()) as { log: { id: number } }).log.id);
  }
  for (const id of ids) {
    let status = "";
    for (let i = 0; i < 480 && status !== "done"; i++) {
      const r = await api(`/api/v1/logs/${id}`);
      const { log } = (await r.json()) as { log: { status: string; error: unknown } };
      status = log.status;
      if (status === "failed")
        throw new Error(`drive log ${id} failed: ${JSON.stringify(log.error)}`);
      if (status !== "done") await new Promise((resolve) => setTimeout(resolve, 250));
    }
    if (status !== "done") throw new Error(`drive log ${id} did not finish`);
  }
  return ids;
}
