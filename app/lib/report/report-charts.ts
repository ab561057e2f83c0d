/**
 * Vector charts for the evidence report, drawn straight into the PDF with pdfkit's path
 * operators (no raster image anywhere): a frame with round-number ticks and the quantity and unit
 * on each axis, lines with their markers, horizontal limit lines over an engine-speed range with
 * the forbidden side tinted, and a legend. Our own plain chart style.
 */
import { COLOURS, type ReportDoc } from "./report-layout";

export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface Axis {
  /** "Engine speed, rpm": the quantity, then its unit. */
  label: string;
  min: number;
  max: number;
}

export interface Series {
  name: string;
  colour: string;
  dash?: [number, number];
  /** Points in data units; a null y breaks the line. */
  points: readonly { x: number; y: number | null; hollow?: boolean; colour?: string }[];
  /** Join only neighbours closer than this in x (a gap in the data stays a gap). */
  maxGap?: number;
}

export interface LimitBox {
  label: string;
  from: number;
  to: number;
  value: number;
  /** "below" tints the side under the line (a minimum), "above" the side over it (a maximum). */
  forbidden: "below" | "above";
  colour: string;
}

export interface Marker {
  x: number;
  y: number;
  label: string;
}

/** Round-number ticks (steps of 1, 2 or 5 × 10^k) covering [min, max], about `count` of them. */
export function niceTicks(min: number, max: number, count = 6): number[] {
  if (!(max > min)) return [min];
  const raw = (max - min) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step - 1e-9) * step; v <= max + step * 1e-9; v += step)
    ticks.push(Math.abs(v) < step * 1e-9 ? 0 : Number(v.toPrecision(12)));
  return ticks;
}

/** The axis range rounded out to ticks, with room around the data. */
export function niceRange(values: readonly number[], o: { pad?: number; zero?: boolean } = {}) {
  let lo = Math.min(...values);
  let hi = Math.max(...values);
  if (o.zero) lo = Math.min(lo, 0);
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return { min: 0, max: 1 };
  if (hi - lo < 1e-9) {
    lo -= 1;
    hi += 1;
  }
  const pad = (hi - lo) * (o.pad ?? 0.06);
  const ticks = niceTicks(o.zero && lo >= 0 ? lo : lo - pad, hi + pad);
  const step = ticks.length > 1 ? ticks[1]! - ticks[0]! : 1;
  const min = o.zero && lo >= 0 ? lo : Math.floor((lo - pad) / step) * step;
  return { min, max: Math.ceil((hi + pad) / step) * step };
}

export const tickText = (v: number) => {
  const t = Number(v.toPrecision(6));
  return t < 0 ? `−${String(-t)}` : String(t);
};

/**
 * Draws one chart in `box` (the whole chart including its axis labels and legend) and returns
 * the plot area. Lines are clipped to the plot area; limit boxes sit under the lines.
 */
export function drawChart(
  doc: ReportDoc,
  box: Box,
  spec: {
    x: Axis;
    y: Axis;
    series: readonly Series[];
    limits?: readonly LimitBox[];
    markers?: readonly Marker[];
    /** A horizontal reference line, e.g. 0 dB. */
    yRef?: { value: number; label: string };
  },
): Box {
  const pdf = doc.pdf;
  const legendH = 14;
  const plot: Box = {
    x: box.x + 44,
    y: box.y + legendH + 4,
    width: box.width - 52,
    height: box.height - legendH - 4 - 32,
  };
  const { x: xa, y: ya } = spec;
  const px = (v: number) => plot.x + ((v - xa.min) / (xa.max - xa.min)) * plot.width;
  const py = (v: number) => plot.y + plot.height - ((v - ya.min) / (ya.max - ya.min)) * plot.height;

  // Grid and ticks.
  pdf.save();
  pdf.lineWidth(0.4).strokeColor(COLOURS.grid);
  const xt = niceTicks(xa.min, xa.max, 7);
  const yt = niceTicks(ya.min, ya.max, 5);
  for (const v of xt) pdf.moveTo(px(v), plot.y).lineTo(px(v), plot.y + plot.height);
  for (const v of yt) pdf.moveTo(plot.x, py(v)).lineTo(plot.x + plot.width, py(v));
  pdf.stroke();
  pdf.restore();
  for (const v of xt)
    doc.text(tickText(v), px(v) - 20, plot.y + plot.height + 3, {
      size: 7,
      width: 40,
      align: "center",
      colour: COLOURS.muted,
      lineGap: 0,
    });
  for (const v of yt)
    doc.text(tickText(v), plot.x - 42, py(v) - 4, {
      size: 7,
      width: 38,
      align: "right",
      colour: COLOURS.muted,
      lineGap: 0,
    });
  doc.text(xa.label, plot.x, plot.y + plot.height + 14, {
    size: 7.5,
    width: plot.width,
    align: "center",
    lineGap: 0,
  });
  pdf.save();
  pdf.rotate(-90, { origin: [box.x + 4, plot.y + plot.height / 2] });
  doc.text(ya.label, box.x + 4 - plot.height / 2, plot.y + plot.height / 2 - 4, {
    size: 7.5,
    width: plot.height,
    align: "center",
    lineGap: 0,
  });
  pdf.restore();

  // Plot area: clip, limits under the lines, reference line, the lines, markers.
  pdf.save();
  pdf.rect(plot.x, plot.y, plot.width, plot.height).clip();
  for (const l of spec.limits ?? []) {
    const x0 = px(Math.max(l.from, xa.min));
    const x1 = px(Math.min(l.to, xa.max));
    if (x1 <= x0) continue;
    const yl = py(l.value);
    const edge = l.forbidden === "below" ? plot.y + plot.height : plot.y;
    pdf.rect(x0, Math.min(yl, edge), x1 - x0, Math.abs(edge - yl));
    pdf.fillColor(l.colour).fillOpacity(0.08).fill();
    pdf.fillOpacity(1);
    pdf.moveTo(x0, yl).lineTo(x1, yl).lineWidth(1.2).strokeColor(l.colour).stroke();
    for (const xe of [x0, x1]) {
      pdf
        .moveTo(xe, yl - 4)
        .lineTo(xe, yl + 4)
        .lineWidth(1.2)
        .strokeColor(l.colour)
        .stroke();
    }
  }
  if (spec.yRef && spec.yRef.value > ya.min && spec.yRef.value < ya.max) {
    const y = py(spec.yRef.value);
    pdf
      .moveTo(plot.x, y)
      .lineTo(plot.x + plot.width, y)
      .lineWidth(0.6);
    pdf.strokeColor(COLOURS.zero).dash(2, { space: 2 }).stroke().undash();
  }
  for (const s of spec.series) drawSeries(doc, s, px, py);
  pdf.restore();

  // Frame.
  pdf.rect(plot.x, plot.y, plot.width, plot.height).lineWidth(0.6).strokeColor(COLOURS.zero);
  pdf.stroke();

  // Labels of the limits and markers, over the lines, on a white box.
  for (const l of spec.limits ?? []) {
    const x0 = px(Math.max(l.from, xa.min));
    const x1 = px(Math.min(l.to, xa.max));
    if (x1 <= x0) continue;
    const yl = py(l.value);
    // On the forbidden side, where a passing curve does not run.
    label(doc, l.label, x0 + 3, l.forbidden === "below" ? yl + 3 : yl - 11, plot, l.colour);
  }
  for (const m of spec.markers ?? []) {
    if (m.x < xa.min || m.x > xa.max || m.y < ya.min || m.y > ya.max) continue;
    const x = px(m.x);
    const y = py(m.y);
    pdf
      .moveTo(x, y - 4)
      .lineTo(x + 4, y)
      .lineTo(x, y + 4)
      .lineTo(x - 4, y)
      .closePath();
    pdf.fillColor(COLOURS.text).fill();
    label(doc, m.label, x + 6, y - 12, plot, COLOURS.text);
  }

  // Legend over the plot.
  let lx = plot.x;
  for (const s of spec.series) {
    const ly = box.y + 5;
    pdf
      .moveTo(lx, ly + 3)
      .lineTo(lx + 16, ly + 3)
      .lineWidth(1.6)
      .strokeColor(s.colour);
    if (s.dash) pdf.dash(s.dash[0], { space: s.dash[1] });
    pdf.stroke().undash();
    doc.text(s.name, lx + 20, ly - 1, { size: 7.5, width: 160, lineGap: 0 });
    lx += 26 + doc.pdf.widthOfString(s.name) + 14;
  }
  doc.y = box.y + box.height;
  return plot;
}

function drawSeries(
  doc: ReportDoc,
  s: Series,
  px: (v: number) => number,
  py: (v: number) => number,
): void {
  const pdf = doc.pdf;
  let open = false;
  let lastX = -Infinity;
  for (const p of s.points) {
    if (p.y === null || (s.maxGap !== undefined && p.x - lastX > s.maxGap)) open = false;
    if (p.y === null) continue;
    if (open) pdf.lineTo(px(p.x), py(p.y));
    else pdf.moveTo(px(p.x), py(p.y));
    open = true;
    lastX = p.x;
  }
  pdf.lineWidth(1.3).strokeColor(s.colour).lineJoin("round");
  if (s.dash) pdf.dash(s.dash[0], { space: s.dash[1] });
  pdf.stroke().undash();
  const r = s.points.length > 60 ? 1.3 : 2;
  for (const p of s.points) {
    if (p.y === null) continue;
    pdf.circle(px(p.x), py(p.y), r);
    if (p.hollow)
      pdf
        .lineWidth(0.8)
        .fillColor("white")
        .strokeColor(p.colour ?? s.colour)
        .fillAndStroke();
    else pdf.fillColor(p.colour ?? s.colour).fill();
  }
}

function label(doc: ReportDoc, text: string, x: number, y: number, plot: Box, colour: string) {
  const pdf = doc.pdf;
  pdf.fontSize(7);
  const w = Math.min(pdf.widthOfString(text) + 4, plot.width - 4);
  const lx = Math.min(Math.max(x, plot.x + 2), plot.x + plot.width - w - 2);
  const ly = Math.min(Math.max(y, plot.y + 2), plot.y + plot.height - 11);
  pdf
    .rect(lx - 2, ly - 1, w, 10)
    .fillColor("white")
    .fillOpacity(0.9)
    .fill();
  pdf.fillOpacity(1);
  doc.text(text, lx, ly, { size: 7, colour, width: w + 4, lineGap: 0 });
}
