/**
 * What the evidence report shows (docs/signoff.md "Evidence report"): built by the data layer
 * (data/signoff-report.server.ts) from a sign-off's frozen record, or from the vehicle's current
 * state for a draft, and drawn by ./evidence-report.ts. Plain data: the renderer reads nothing
 * else, so the same model always gives the same pages.
 */
import type { AnalysisResult } from "../signal/result-schema";
import type {
  ClaimCheck,
  RecordLog,
  RecordTarget,
  SignoffRecord,
  SignoffState,
} from "../domain/signoff";
import type { TargetVerdict } from "../domain/targets";

export interface ReportLog {
  log: RecordLog;
  /**
   * The analysis result the verdicts were made from (the sign-off's frozen copy), without the
   * order map, which the report does not draw.
   */
  result: Omit<AnalysisResult, "orderMap">;
  /** This log's verdicts against every target of the report (claimed or not). */
  verdicts: TargetVerdict[];
}

export interface ReportStep {
  step: SignoffState;
  by: string;
  at: string;
  text: string;
}

export interface ReportModel {
  /** Watermark every page "draft": a proposal, or a draft of the vehicle's current state. */
  draft: boolean;
  /** "approved" etc. for a sign-off; "current state" for a vehicle draft. */
  state: SignoffState | "current state";
  signoffId: number | null;
  /** The vehicle's figures that verdicts read, as a sign-off's record holds them. */
  vehicle: SignoffRecord["vehicle"];
  damperVariant: string;
  /** The team's name, shown as the programme in the header. */
  programme: string;
  /** The date in the header: the approval's, else the proposal's, else the generation's (ISO). */
  date: string;
  /** When the PDF was made (ISO); also the PDF's creation date. */
  generatedAt: string;
  /** The software that made the record, e.g. "twistlog 0.1.0+3f2c9a1e07b4" (softwareVersion()). */
  softwareVersion: string;
  targets: RecordTarget[];
  /** One row per claimed target (a vehicle draft: every target, over every finished log). */
  claims: ClaimCheck[];
  logs: ReportLog[];
  note: string;
  /** SHA-256 of the approved record; null before approval. */
  digest: string | null;
  /** Proposed, approved/rejected, superseded, withdrawn: who, when, what they wrote. */
  steps: ReportStep[];
  /** The usual cautions (road tests, rotating parts, workshop work), one paragraph each. */
  cautions: string[];
  /** Amplitudes in the team's unit, as on its pages. */
  amplitudeUnit: "rpm" | "rad/s";
}
