import {
  dbNumber,
  isolationRangeText,
  percentText,
  rpmNumber,
  sampleRateText,
  secondsText,
} from "~/lib/domain/format";
import type { AnalysisSummary } from "~/lib/domain/analysis-summary";
import { countText } from "~/lib/base/plural";
import { tableClass, tdClass, Tile, thClass } from "./page";

/** The settings and the isolation curve as a table: below the charts, for tracing every figure. */
export function AnalysisDetails({
  s,
  team,
}: {
  s: AnalysisSummary;
  /** The team's channel names and strict flag this version read with; null for older versions. */
  team?: { channelNames: { name: string; role: string; unit?: string }[]; strict: boolean } | null;
}) {
  // The same range, by the same rule, as the isolation curve's text alternative.
  const range = isolationRangeText(
    s.curve.map((p) => p.dB),
    s.curve.map((p) => p.aboveNoise),
  );
  return (
    <div className="space-y-6">
      <Tile title="Analysis settings">
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 text-sm sm:grid-cols-[auto_1fr_auto_1fr_auto_1fr]">
          <dt className="text-neutral-600">Samples per rev</dt>
          <dd>
            {s.settings.samplesPerRevMin === s.settings.samplesPerRev
              ? s.settings.samplesPerRev
              : `${s.settings.samplesPerRevMin}–${s.settings.samplesPerRev}`}
          </dd>
          <dt className="text-neutral-600">Revs per block</dt>
          <dd>
            {s.settings.revsPerBlock} (order resolution {(1 / s.settings.revsPerBlock).toFixed(3)})
          </dd>
          <dt className="text-neutral-600">Block overlap</dt>
          <dd>{percentText(s.settings.overlap)}</dd>
          <dt className="text-neutral-600">Bin width</dt>
          <dd>{s.settings.binRpm} rpm</dd>
          <dt className="text-neutral-600">Recording</dt>
          <dd>
            {secondsText(s.durationS)} at {sampleRateText(s.sampleRateHz)}
          </dd>
          {team ? (
            <>
              <dt className="text-neutral-600">Team channel names</dt>
              <dd data-team-channel-names={team.channelNames.length}>
                {team.channelNames.length
                  ? team.channelNames
                      .map((c) => `${c.name} → ${c.role}${c.unit ? ` (${c.unit})` : ""}`)
                      .join(", ")
                  : "none"}
              </dd>
              <dt className="text-neutral-600">Imperfect logs</dt>
              <dd>{team.strict ? "refused (strict)" : "repaired"}</dd>
            </>
          ) : null}
        </dl>
      </Tile>
      <details
        id="isolation"
        className="rounded-lg border border-neutral-200 bg-white p-5 shadow-xs"
      >
        <summary className="cursor-pointer text-sm font-semibold">
          Isolation curve at the firing order as a table (
          {countText(s.curve.length, "engine speed")}
          {range ? `, ${range}` : ""})
        </summary>
        <div className="mt-3">
          {s.curve.length === 0 ? (
            <p className="text-sm text-neutral-600">No engine-speed bins.</p>
          ) : (
            <div className="max-h-96 overflow-auto">
              <table className={tableClass}>
                <caption className="sr-only">Isolation in dB against engine speed</caption>
                <thead className="sticky top-0 bg-white">
                  <tr>
                    <th className={thClass}>Engine speed (rpm)</th>
                    <th className={thClass}>Isolation (dB)</th>
                    <th className={thClass}>Blocks</th>
                    <th className={thClass}>Above noise</th>
                  </tr>
                </thead>
                <tbody>
                  {s.curve.map((p) => (
                    <tr key={p.rpm}>
                      <td className={tdClass}>{rpmNumber(p.rpm)}</td>
                      <td className={`${tdClass} tabular-nums`}>{dbNumber(p.dB)}</td>
                      <td className={tdClass}>{p.blocks}</td>
                      <td className={tdClass}>{p.aboveNoise ? "yes" : "no"}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </div>
      </details>
    </div>
  );
}
