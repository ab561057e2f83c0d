import { COLOURS } from "./palette";
import { fillDiamond } from "./plot-kit";

/** One legend entry: drawn the same way in the page (SVG) and in a PNG export (canvas). */
export type LegendEntry =
  | { kind: "line"; label: string; colour: string; dash?: number[]; width?: number }
  | { kind: "area"; label: string; colour: string; border?: string }
  | {
      kind: "point";
      label: string;
      colour: string;
      shape?: "circle" | "ring" | "diamond" | "caret" | "square" | "pennant";
    };

const W = 22;
const H = 12;

/** The legend entry for pinned comments, when the chart draws any (else nothing). */
export function commentLegend(markers: readonly unknown[]): LegendEntry[] {
  return markers.length
    ? [{ kind: "line", label: "Comment", colour: COLOURS.marker, dash: [4, 3], width: 1.25 }]
    : [];
}

export function Swatch({ entry }: { entry: LegendEntry }) {
  return (
    <svg width={W} height={H} viewBox={`0 0 ${W} ${H}`} aria-hidden="true" className="shrink-0">
      {entry.kind === "line" ? (
        <line
          x1={1}
          x2={W - 1}
          y1={H / 2}
          y2={H / 2}
          stroke={entry.colour}
          strokeWidth={entry.width ?? 2}
          strokeDasharray={entry.dash?.length ? entry.dash.join(" ") : undefined}
        />
      ) : entry.kind === "area" ? (
        <rect
          x={1}
          y={1}
          width={W - 2}
          height={H - 2}
          fill={entry.colour}
          stroke={entry.border ?? COLOURS.grid}
        />
      ) : (
        <PointShape shape={entry.shape ?? "circle"} colour={entry.colour} />
      )}
    </svg>
  );
}

function PointShape({ shape, colour }: { shape: string; colour: string }) {
  const cx = W / 2;
  const cy = H / 2;
  if (shape === "diamond")
    return (
      <path d={`M${cx} 1 L${cx + 5} ${cy} L${cx} ${H - 1} L${cx - 5} ${cy} Z`} fill={colour} />
    );
  if (shape === "caret")
    return (
      <g fill="none" stroke={colour} strokeWidth={1.5}>
        <circle cx={cx} cy={cy + 2} r={3} fill="white" />
        <path d={`M${cx - 3} ${cy - 3} L${cx} ${cy - 6} L${cx + 3} ${cy - 3}`} />
      </g>
    );
  if (shape === "square")
    return (
      <g fill="none" stroke={colour} strokeWidth={1.5}>
        <rect x={cx - 4.5} y={cy - 4.5} width={9} height={9} />
        <circle cx={cx} cy={cy} r={2} fill={colour} stroke="none" />
      </g>
    );
  if (shape === "pennant")
    return (
      <g fill={colour} stroke={colour} strokeWidth={1.5}>
        <line x1={cx - 4} x2={cx - 4} y1={1} y2={H - 1} />
        <path d={`M${cx - 4} 1 L${cx + 6} 4 L${cx - 4} 7 Z`} stroke="none" />
      </g>
    );
  if (shape === "ring")
    return <circle cx={cx} cy={cy} r={3.5} fill="white" stroke={colour} strokeWidth={1.5} />;
  return <circle cx={cx} cy={cy} r={3.5} fill={colour} />;
}

export function Legend({ entries }: { entries: LegendEntry[] }) {
  return (
    <ul className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-neutral-700" aria-label="Legend">
      {entries.map((e) => (
        <li key={e.label} className="flex items-center gap-1.5">
          <Swatch entry={e} />
          <span>{e.label}</span>
        </li>
      ))}
    </ul>
  );
}

/** Draws a legend entry's swatch on a canvas at (x, y) = top-left, `s` = pixels per CSS px. */
export function paintSwatch(
  ctx: CanvasRenderingContext2D,
  entry: LegendEntry,
  x: number,
  y: number,
  s: number,
) {
  ctx.save();
  if (entry.kind === "line") {
    ctx.strokeStyle = entry.colour;
    ctx.lineWidth = (entry.width ?? 2) * s;
    ctx.setLineDash((entry.dash ?? []).map((d) => d * s));
    ctx.beginPath();
    ctx.moveTo(x + s, y + (H / 2) * s);
    ctx.lineTo(x + (W - 1) * s, y + (H / 2) * s);
    ctx.stroke();
  } else if (entry.kind === "area") {
    ctx.fillStyle = entry.colour;
    ctx.fillRect(x + s, y + s, (W - 2) * s, (H - 2) * s);
    ctx.strokeStyle = entry.border ?? COLOURS.grid;
    ctx.lineWidth = s;
    ctx.strokeRect(x + s, y + s, (W - 2) * s, (H - 2) * s);
  } else {
    const cx = x + (W / 2) * s;
    const cy = y + (H / 2) * s;
    ctx.fillStyle = entry.colour;
    ctx.strokeStyle = entry.colour;
    ctx.lineWidth = 1.5 * s;
    ctx.beginPath();
    if (entry.shape === "diamond") {
      fillDiamond(ctx, cx, cy, 5 * s, (H / 2 - 1) * s);
    } else if (entry.shape === "square") {
      ctx.strokeRect(cx - 4.5 * s, cy - 4.5 * s, 9 * s, 9 * s);
      ctx.arc(cx, cy, 2 * s, 0, 2 * Math.PI);
      ctx.fill();
    } else if (entry.shape === "pennant") {
      ctx.moveTo(cx - 4 * s, y + s);
      ctx.lineTo(cx - 4 * s, y + (H - 1) * s);
      ctx.stroke();
      ctx.beginPath();
      ctx.moveTo(cx - 4 * s, y + s);
      ctx.lineTo(cx + 6 * s, y + 4 * s);
      ctx.lineTo(cx - 4 * s, y + 7 * s);
      ctx.closePath();
      ctx.fill();
    } else if (entry.shape === "ring" || entry.shape === "caret") {
      ctx.arc(cx, entry.shape === "caret" ? cy + 2 * s : cy, 3 * s, 0, 2 * Math.PI);
      ctx.fillStyle = "white";
      ctx.fill();
      ctx.stroke();
      if (entry.shape === "caret") {
        ctx.beginPath();
        ctx.moveTo(cx - 3 * s, cy - 3 * s);
        ctx.lineTo(cx, cy - 6 * s);
        ctx.lineTo(cx + 3 * s, cy - 3 * s);
        ctx.stroke();
      }
    } else {
      ctx.arc(cx, cy, 3.5 * s, 0, 2 * Math.PI);
      ctx.fill();
    }
  }
  ctx.restore();
}

export const SWATCH_WIDTH = W;
