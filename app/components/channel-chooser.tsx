/**
 * The "Channel chooser" of a drive log: every channel of the file (CSV columns or MDF4
 * channels alike, from GET /api/v1/logs/:logId/channels) with unit, group, rate, count and
 * range, a filter box, one radio per role and row (the recognised roles preselected), the
 * units of the speeds, the picked speeds' ranges and rates side by side and a small chart of
 * them against time (read with the picks and units, so it changes with them). It posts the
 * page's `map` intent; the choice is remembered for the vehicle (column-choice.server.ts).
 */
import { useQuery } from "@tanstack/react-query";
import { useMemo, useState } from "react";
import { Form } from "react-router";
import type { AppliedMapping } from "~/lib/domain/drive-log-terms";
import type { ChannelInfo } from "~/lib/signal/types";
import { SPEED_UNITS } from "~/lib/signal/units";
import { CsrfInput } from "./csrf-input";
import { ErrorLine, SubmitButton } from "./form";
import { inputClass } from "./form-fields";
import { ChannelRows } from "./channel-rows";
import { initialPicks, type Picks } from "./channel-picks";
import { PickedSpeeds } from "./picked-speeds";
import { SpeedPreview } from "./charts/speed-preview";

/** The file's channel list, fetched once per page (it is cached on the server too). */
export function useChannels(logId: number, enabled: boolean) {
  return useQuery({
    queryKey: ["log-channels", logId],
    enabled,
    staleTime: Infinity,
    retry: false,
    queryFn: async (): Promise<ChannelInfo[]> => {
      const r = await fetch(`/api/v1/logs/${logId}/channels`, {
        headers: { Accept: "application/json" },
      });
      const body = (await r.json().catch(() => null)) as {
        channels?: ChannelInfo[];
        error?: { message: string };
      } | null;
      if (!r.ok || !body?.channels)
        throw new Error(body?.error?.message ?? `the server answered ${r.status}`);
      return body.channels;
    },
  });
}

/** The preview's URL: the drive log's channel-preview.json with the picks and units. */
function previewUrl(vehicleId: number, logId: number, picks: Picks, units: Units): string {
  const q = new URLSearchParams();
  for (const [key, value] of [
    ["time", picks.time],
    ["crank", picks.crank],
    ["gearbox", picks.gearbox],
    ["crankUnit", units.crank],
    ["gearboxUnit", units.gearbox],
  ] as const)
    if (value) q.set(key, value);
  return `/vehicles/${vehicleId}/logs/${logId}/channel-preview.json?${q}`;
}

type Units = { crank: string; gearbox: string };

export function ChannelChooser({
  vehicleId,
  logId,
  channels,
  applied,
}: {
  vehicleId: number;
  logId: number;
  channels: ChannelInfo[];
  applied: AppliedMapping | null;
}) {
  const [filter, setFilter] = useState("");
  const [picks, setPicks] = useState<Picks>(() => initialPicks(channels, applied));
  const [units, setUnits] = useState<Units>(() => ({
    crank: applied?.mapping.crankUnit ?? "",
    gearbox: applied?.mapping.gearboxUnit ?? "",
  }));
  const shown = useMemo(() => {
    const words = filter.trim().toLowerCase().split(/\s+/).filter(Boolean);
    return channels.filter((c) => {
      const text = `${c.name} ${c.unit ?? ""} ${c.group ?? ""}`.toLowerCase();
      return words.every((w) => text.includes(w));
    });
  }, [channels, filter]);
  return (
    <Form method="post" className="space-y-4" aria-describedby="chooser-help">
      <CsrfInput />
      <input type="hidden" name="intent" value="map" />
      <p id="chooser-help" className="text-sm text-neutral-600">
        Pick one channel for each of time, crank-side speed and gearbox-input speed. Leave a role on
        “recognise” to let the file's names decide.
      </p>
      <div className="max-w-sm">
        <label htmlFor="channel-filter" className="block text-sm font-medium text-neutral-800">
          Filter channels
        </label>
        <input
          id="channel-filter"
          type="search"
          value={filter}
          onChange={(e) => setFilter(e.target.value)}
          placeholder="name, unit or group"
          aria-controls="channel-rows"
          className={`mt-1 ${inputClass}`}
        />
        <p className="mt-1 text-xs text-neutral-500" role="status" aria-live="polite">
          {shown.length === channels.length
            ? `${channels.length} channels`
            : `${shown.length} of ${channels.length} channels shown`}
        </p>
      </div>
      <ChannelRows
        channels={shown}
        picks={picks}
        onPick={(role, name) => setPicks({ ...picks, [role]: name })}
      />
      <PickedSpeeds channels={channels} picks={picks} />
      <div className="grid gap-4 sm:grid-cols-2">
        {(["crank", "gearbox"] as const).map((role) => (
          <div key={role}>
            <label htmlFor={`${role}-unit`} className="block text-sm font-medium text-neutral-800">
              {role === "crank" ? "Crank speed unit" : "Gearbox speed unit"}
            </label>
            <select
              id={`${role}-unit`}
              name={`${role}Unit`}
              value={units[role]}
              onChange={(e) => setUnits({ ...units, [role]: e.target.value })}
              className={`mt-1 ${inputClass}`}
            >
              <option value="">As the file says</option>
              {SPEED_UNITS.map((u) => (
                <option key={u} value={u}>
                  {u}
                </option>
              ))}
            </select>
          </div>
        ))}
      </div>
      {/* After the units: the chart shows the speeds read in them. */}
      <SpeedPreview url={previewUrl(vehicleId, logId, picks, units)} />
      <p className="text-sm text-neutral-600">
        The choice is remembered for this vehicle: its next uploads use it when their files have
        these channels, and are recognised from the file otherwise.
      </p>
      <SubmitButton>Analyse with these channels</SubmitButton>
    </Form>
  );
}

/** Loading, error and empty states around the chooser. */
export function ChannelChooserState({
  query,
  children,
}: {
  query: ReturnType<typeof useChannels>;
  children: (channels: ChannelInfo[]) => React.ReactNode;
}) {
  if (query.isPending)
    return (
      <p role="status" className="text-sm text-neutral-600">
        Reading the file's channels…
      </p>
    );
  if (query.isError)
    return (
      <ErrorLine message={`The file's channels could not be listed: ${query.error.message}`} />
    );
  if (query.data.length === 0)
    return <p className="text-sm text-neutral-600">The file has no channels that could be read.</p>;
  return <>{children(query.data)}</>;
}
