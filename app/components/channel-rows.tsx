/**
 * The channel chooser's table: one row per channel, and per row one radio for each role (a
 * radio group per role runs down the table, so the arrow keys move a role from channel to
 * channel). A picked channel hidden by the filter still goes with the form.
 */
import type { ChannelInfo, ChannelRole } from "~/lib/signal/types";
import type { Picks } from "./channel-picks";
import { tableClass, tdClass, thClass } from "./page";

export type { Picks } from "./channel-picks";

export const CHOOSER_ROLES: { role: ChannelRole; field: string; label: string }[] = [
  { role: "time", field: "timeChannel", label: "Time" },
  { role: "crank", field: "crankChannel", label: "Crank" },
  { role: "gearbox", field: "gearboxChannel", label: "Gearbox" },
];

/** A figure for the table: up to 5 significant digits, "—" when the file does not tell. */
export function figure(x: number | null, unit?: string | null): string {
  if (x === null || !Number.isFinite(x)) return "—";
  const text = Math.abs(x) >= 1e6 ? x.toExponential(3) : String(Number(x.toPrecision(5)));
  return unit ? `${text} ${unit}` : text;
}

export function rangeText(c: ChannelInfo): string {
  return c.min === null || c.max === null ? "—" : `${figure(c.min)} to ${figure(c.max)}`;
}

export function ChannelRows({
  channels,
  picks,
  onPick,
}: {
  channels: ChannelInfo[];
  picks: Picks;
  onPick: (role: ChannelRole, name: string) => void;
}) {
  const shownNames = new Set(channels.map((c) => c.name));
  const radio = (role: ChannelRole, field: string, label: string, name: string, text: string) => (
    <input
      type="radio"
      name={field}
      value={name}
      checked={picks[role] === name}
      onChange={() => onPick(role, name)}
      aria-label={`${label}: ${text}`}
      className="size-4 accent-indigo-600"
    />
  );
  return (
    <div id="channel-rows" className="max-h-96 overflow-auto rounded-md border border-neutral-200">
      {CHOOSER_ROLES.map(({ role, field }) =>
        picks[role] && !shownNames.has(picks[role]) ? (
          <input key={role} type="hidden" name={field} value={picks[role]} />
        ) : null,
      )}
      <table className={`${tableClass} text-sm`}>
        <caption className="px-3 py-2 text-left text-sm text-neutral-600">
          The file's channels; pick one per role
        </caption>
        <thead className="sticky top-0 bg-white">
          <tr>
            {["Channel", "Unit", "Group", "Rate", "Samples", "Range"].map((h) => (
              <th key={h} scope="col" className={`${thClass} px-3 whitespace-nowrap`}>
                {h}
              </th>
            ))}
            {CHOOSER_ROLES.map(({ role, label }) => (
              <th key={role} scope="col" className={`${thClass} px-3 text-center`}>
                {label}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          <tr>
            <td className={`${tdClass} px-3 text-neutral-600 italic`} colSpan={6}>
              Recognise from the file
            </td>
            {CHOOSER_ROLES.map(({ role, field, label }) => (
              <td key={role} className={`${tdClass} px-3 text-center`}>
                {radio(role, field, label, "", "recognise from the file")}
              </td>
            ))}
          </tr>
          {channels.length === 0 ? (
            <tr>
              <td className={`${tdClass} px-3 text-neutral-600`} colSpan={9}>
                No channel matches the filter.
              </td>
            </tr>
          ) : null}
          {channels.map((c) => (
            <tr key={`${c.group ?? ""}/${c.name}`} data-channel={c.name}>
              <th scope="row" className={`${tdClass} px-3 text-left font-mono font-normal`}>
                {c.name}
                {c.role ? (
                  <span className="ml-2 rounded-sm bg-indigo-50 px-1 font-sans text-xs text-indigo-800">
                    recognised: {c.role}
                  </span>
                ) : null}
              </th>
              <td className={`${tdClass} px-3`}>{c.unit ?? "—"}</td>
              <td className={`${tdClass} px-3`}>{c.group ?? "—"}</td>
              <td className={`${tdClass} px-3 whitespace-nowrap tabular-nums`}>
                {figure(c.sampleRateHz, "Hz")}
              </td>
              <td className={`${tdClass} px-3 tabular-nums`}>{c.samples}</td>
              <td className={`${tdClass} px-3 whitespace-nowrap tabular-nums`}>{rangeText(c)}</td>
              {CHOOSER_ROLES.map(({ role, field, label }) => (
                <td key={role} className={`${tdClass} px-3 text-center`}>
                  {radio(role, field, label, c.name, c.name)}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
