/**
 * One drive log's pages in the evidence report: its facts and verdicts, the isolation curve with
 * the isolation targets drawn over their engine-speed ranges, the firing-order curves of both
 * sides, the rattle check at idle and the engine start/stop events. Each part says in a sentence
 * when the result has nothing to draw.
 */
import { convertAmplitude } from "../domain/chart-units";
import {
  dampingRatioText,
  dbText,
  frequencyText,
  orderNumber,
  rpmText,
  sampleRateText,
  secondsText,
} from "../domain/format";
import type { ReportLog, ReportModel } from "./report-model";
import { drawChart, niceRange, type LimitBox, type Series } from "./report-charts";
import { drawEvents, drawRattle } from "./report-log-figures";
import { COLOURS, CONTENT_WIDTH, MARGIN, type ReportDoc } from "./report-layout";
import { drawFacts, drawTable, type Cell } from "./report-tables";
import { logConditionText, marginText, timeText, unitText, verdictWords } from "./report-text";

/** The result as the report holds it (no order map). */
type Result = ReportLog["result"];

const statusColour = (s: string) =>
  s === "pass" ? COLOURS.pass : s === "fail" ? COLOURS.fail : COLOURS.muted;

export function drawLogPages(doc: ReportDoc, model: ReportModel, entry: ReportLog, index: number) {
  const { log, result } = entry;
  doc.newPage();
  doc.pdf.outline.addItem(`Drive log ${index + 1}: ${log.fileName}`);
  doc.heading(`Drive log ${index + 1} of ${model.logs.length}: ${log.fileName}`, 2, 100);
  drawFacts(doc, [
    ["Test", `${logConditionText(log)}; damper variant ${log.damperVariant}`],
    [
      "Analysis",
      `Version ${log.analysis.version} (analysis ${log.analysis.id}) of ${timeText(log.analysis.createdAt)}`,
    ],
    [
      "Recording",
      `${secondsText(result.durationS)} at ${sampleRateText(result.sampleRateHz)}; firing order ${orderNumber(result.firingOrder)}; ${result.blocks} blocks`,
    ],
    [
      "Damper resonance",
      result.resonance
        ? `${rpmText(result.resonance.rpm)}, isolation there ${dbText(result.resonance.isolationDb)}`
        : "Not found in this drive log",
    ],
    [
      "Two-mass model fit",
      result.model
        ? `Natural frequency ${frequencyText(result.model.naturalFrequencyHz)}, damping ratio ${dampingRatioText(result.model.dampingRatio)}, rms error ${dbText(result.model.rmsErrorDb)} over ${result.model.bins} bins`
        : "No fit (too few bins around a resonance)",
    ],
  ]);

  doc.heading("Verdicts of this drive log", 3, 40);
  const claimed = new Set(model.claims.map((c) => c.targetId));
  if (entry.verdicts.length === 0) doc.para("The vehicle has no targets to judge this drive log.");
  else
    drawTable(
      doc,
      [
        { header: "Target", width: 0.22 },
        { header: "Verdict", width: 0.12 },
        { header: "Value", width: 0.11, align: "right" },
        { header: "Margin", width: 0.11, align: "right" },
        { header: "What was found", width: 0.44 },
      ],
      entry.verdicts.map((v): Cell[] => [
        claimed.has(v.targetId) ? `${v.name} (claimed)` : v.name,
        { text: verdictWords[v.status], face: "bold", colour: statusColour(v.status) },
        v.value === null ? "—" : unitText(v.value, v.unit),
        marginText(v.margin, v.unit),
        v.detail,
      ]),
      { size: 7.5 },
    );

  drawIsolation(doc, model, entry);
  drawOrderCurves(doc, model, result);
  drawRattle(doc, model, result);
  drawEvents(doc, model, result);
}

function drawIsolation(doc: ReportDoc, model: ReportModel, entry: ReportLog) {
  const result = entry.result;
  doc.heading(`Isolation at the firing order (order ${orderNumber(result.firingOrder)})`, 3, 230);
  const iso = result.isolation;
  const bands = model.targets.filter(
    (t) => t.kind === "isolation" && t.rpmFrom !== null && t.rpmTo !== null && t.minDb !== null,
  );
  if (iso.length === 0) {
    doc.para(
      "This drive log has no isolation bins: no engine-speed bin holds enough blocks of both speeds. A longer recording, or re-analysing with wider bins, gives a curve.",
      { colour: COLOURS.muted },
    );
    return;
  }
  const verdictOf = new Map(entry.verdicts.map((v) => [v.targetId, v.status]));
  const limits: LimitBox[] = bands.map((t) => ({
    label: `${t.name}: at least ${dbText(t.minDb)}`,
    from: t.rpmFrom!,
    to: t.rpmTo!,
    value: t.minDb!,
    forbidden: "below",
    colour:
      verdictOf.get(t.id) === "pass"
        ? COLOURS.pass
        : verdictOf.get(t.id) === "fail"
          ? COLOURS.fail
          : COLOURS.zero,
  }));
  const below = (p: (typeof iso)[number]) =>
    p.aboveNoise && bands.some((t) => p.rpm >= t.rpmFrom! && p.rpm <= t.rpmTo! && p.dB < t.minDb!);
  const series: Series = {
    name: "Isolation, crank over gearbox input",
    colour: COLOURS.isolation,
    maxGap: 1.5 * result.settings.binRpm,
    points: iso.map((p) => ({
      x: p.rpm,
      y: p.dB,
      hollow: !p.aboveNoise,
      colour: below(p) ? COLOURS.fail : undefined,
    })),
  };
  const rpms = [...iso.map((p) => p.rpm), ...bands.flatMap((t) => [t.rpmFrom!, t.rpmTo!])];
  const dbs = [...iso.map((p) => p.dB), ...bands.map((t) => t.minDb!), 0];
  drawChart(
    doc,
    { x: MARGIN.left, y: doc.y, width: CONTENT_WIDTH, height: 215 },
    {
      x: { label: "Engine speed, rpm", ...niceRange(rpms, { pad: 0.03 }) },
      y: { label: "Isolation, dB", ...niceRange(dbs, { pad: 0.1 }) },
      series: [series],
      limits,
      yRef: { value: 0, label: "0 dB" },
      markers: result.resonance
        ? [
            {
              x: result.resonance.rpm,
              y: result.resonance.isolationDb,
              label: `Resonance ${rpmText(result.resonance.rpm)}`,
            },
          ]
        : [],
    },
  );
  const notes = [
    "Isolation = 20·log10(crank amplitude / gearbox-input amplitude) at the firing order; positive means the damper attenuates.",
    "A target's line spans its engine-speed range, the tint marks the side that fails it; the line is green where this drive log passes, red where it fails, grey otherwise.",
  ];
  if (iso.some((p) => !p.aboveNoise))
    notes.push(
      "Hollow points: the gearbox signal there is within its noise floor, so the isolation is only known to be at least the value shown.",
    );
  const t = result.transient;
  if (t && t.lowestResolvedRpm !== null && t.unresolvedReason)
    notes.push(
      `Not resolved below ${rpmText(t.lowestResolvedRpm)}: ${t.unresolvedReason.replace(/([^.])$/, "$1.")}`,
    );
  doc.para(notes.join(" "), { size: 7.5, colour: COLOURS.muted });
}

/** The firing-order curve of the result, if it has one. */
function firingCurve(result: Result) {
  return result.orderCurves.find((c) => Math.abs(c.order - result.firingOrder) < 1e-6) ?? null;
}

function drawOrderCurves(doc: ReportDoc, model: ReportModel, result: Result) {
  doc.heading("Firing-order amplitude, crank and gearbox input", 3, 210);
  const curve = firingCurve(result);
  if (!curve || curve.points.length === 0) {
    doc.para(
      "No order curve: no engine-speed bin holds enough blocks. A longer recording, or re-analysing with wider bins, gives one.",
      { colour: COLOURS.muted },
    );
    return;
  }
  const unit = model.amplitudeUnit;
  const conv = (v: number, rpm: number) => convertAmplitude(v, unit, curve.order, rpm);
  const crank = curve.points.map((p) => ({ x: p.rpm, y: conv(p.crankRpm, p.rpm) }));
  const gearbox = curve.points.map((p) => ({ x: p.rpm, y: conv(p.gearboxRpm, p.rpm) }));
  const gap = 1.5 * result.settings.binRpm;
  drawChart(
    doc,
    { x: MARGIN.left, y: doc.y, width: CONTENT_WIDTH, height: 195 },
    {
      x: {
        label: "Engine speed, rpm",
        ...niceRange(
          crank.map((p) => p.x),
          { pad: 0.03 },
        ),
      },
      y: {
        label: `Amplitude (0-peak), ${unit}`,
        ...niceRange(
          [...crank, ...gearbox].map((p) => p.y),
          { zero: true },
        ),
      },
      series: [
        { name: "Crank", colour: COLOURS.crank, points: crank, maxGap: gap },
        {
          name: "Gearbox input",
          colour: COLOURS.gearbox,
          dash: [5, 2.5],
          points: gearbox,
          maxGap: gap,
        },
      ],
    },
  );
  doc.para(
    `0-peak angular-velocity amplitude of order ${orderNumber(curve.order)} per engine-speed bin, in ${unit}${
      unit === "rad/s" ? " (1 rpm = 0.10472 rad/s)" : ""
    }.`,
    { size: 7.5, colour: COLOURS.muted },
  );
}
