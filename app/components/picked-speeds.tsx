/**
 * The chooser's preview of the picked speeds: their ranges drawn on one shared scale, with rate
 * and sample count beside, so a swapped or wrongly scaled channel (a gearbox at 0–5, a crank in
 * rad/s read as rpm) shows before the analysis runs. Ranges and rates only: no trace is read.
 */
import type { ChannelInfo } from "~/lib/signal/types";
import { figure, rangeText, type Picks } from "./channel-rows";

const BARS = [
  { role: "crank", label: "Crank-side speed", colour: "#4338ca" },
  { role: "gearbox", label: "Gearbox-input speed", colour: "#0f766e" },
] as const;

export function PickedSpeeds({ channels, picks }: { channels: ChannelInfo[]; picks: Picks }) {
  const picked = BARS.map((b) => ({
    ...b,
    channel: channels.find((c) => c.name === picks[b.role]) ?? null,
  }));
  const known = picked.flatMap((p) =>
    p.channel && p.channel.min !== null && p.channel.max !== null
      ? [p.channel.min, p.channel.max]
      : [],
  );
  // The scale spans the picked ranges (5 % margin), so two close speeds are told apart; a
  // speed read in the wrong unit (rad/s as rpm) still stands far off the other.
  const span = known.length ? Math.max(...known) - Math.min(...known) : 1;
  const lo = known.length ? Math.min(...known) - 0.05 * (span || 1) : 0;
  const hi = known.length ? Math.max(...known) + 0.05 * (span || 1) : 1;
  const x = (v: number) => 4 + ((v - lo) / (hi - lo)) * 292;
  return (
    <section aria-labelledby="picked-title" className="rounded-md bg-neutral-50 p-3">
      <h3 id="picked-title" className="text-sm font-semibold text-neutral-900">
        The picked speeds side by side
      </h3>
      <dl className="mt-2 grid gap-2 text-sm sm:grid-cols-[auto_1fr_auto]">
        {picked.map((p) => (
          <div key={p.role} className="contents" data-picked={p.role}>
            <dt className="font-medium" style={{ color: p.colour }}>
              {p.label}
            </dt>
            <dd>
              {p.channel ? (
                <>
                  <span className="font-mono">{p.channel.name}</span>: {rangeText(p.channel)}{" "}
                  {p.channel.unit ?? ""}
                </>
              ) : (
                <span className="text-neutral-600">recognised from the file</span>
              )}
            </dd>
            <dd className="text-neutral-600 tabular-nums">
              {p.channel
                ? `${p.channel.sampleRateHz === null ? "rate not stated" : figure(p.channel.sampleRateHz, "Hz")}, ${p.channel.samples} samples`
                : ""}
            </dd>
          </div>
        ))}
      </dl>
      {known.length ? (
        // Decorative: the same ranges are in the text above.
        <svg viewBox="0 0 300 44" className="mt-2 h-11 w-full max-w-md" aria-hidden="true">
          <line x1="4" x2="296" y1="40" y2="40" stroke="#a3a3a3" />
          <text x="4" y="38" fontSize="8" fill="#525252">
            {figure(lo)}
          </text>
          <text x="296" y="38" fontSize="8" fill="#525252" textAnchor="end">
            {figure(hi)}
          </text>
          {picked.map((p, i) =>
            p.channel && p.channel.min !== null && p.channel.max !== null ? (
              <rect
                key={p.role}
                x={x(p.channel.min)}
                width={Math.max(2, x(p.channel.max) - x(p.channel.min))}
                y={4 + i * 14}
                height="10"
                rx="2"
                fill={p.colour}
              />
            ) : null,
          )}
        </svg>
      ) : null}
    </section>
  );
}
