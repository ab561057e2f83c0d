/**
 * The chooser's list of the picked speeds: name, range as the file states it, rate and sample
 * count, so a swapped or wrongly scaled channel (a gearbox at 0–5, a crank in rad/s read as rpm)
 * shows before the analysis runs. The chart of them against time is SpeedPreview (charts/).
 */
import type { ChannelInfo } from "~/lib/signal/types";
import { figure, rangeText, type Picks } from "./channel-rows";

const BARS = [
  // The chart's meaning colours (docs/ui.md), a shade darker for text contrast.
  { role: "crank", label: "Crank-side speed", colour: "text-amber-800" },
  { role: "gearbox", label: "Gearbox-input speed", colour: "text-teal-800" },
] as const;

export function PickedSpeeds({ channels, picks }: { channels: ChannelInfo[]; picks: Picks }) {
  const picked = BARS.map((b) => ({
    ...b,
    channel: channels.find((c) => c.name === picks[b.role]) ?? null,
  }));
  return (
    <section aria-labelledby="picked-title" className="rounded-md bg-neutral-50 p-3">
      <h3 id="picked-title" className="text-sm font-semibold text-neutral-900">
        The picked speeds side by side
      </h3>
      <dl className="mt-2 grid gap-2 text-sm sm:grid-cols-[auto_1fr_auto]">
        {picked.map((p) => (
          <div key={p.role} className="contents" data-picked={p.role}>
            <dt className={`font-medium ${p.colour}`}>{p.label}</dt>
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
    </section>
  );
}
