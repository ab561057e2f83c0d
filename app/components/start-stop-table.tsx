import { Link } from "react-router";
import { endStopMargin, eventNames } from "~/lib/domain/chart-data";
import {
  dbNumber,
  degreesNumber,
  degreesText,
  radS2Number,
  rpmNumber,
  secondsNumber,
} from "~/lib/domain/format";
import type { TransientEvent } from "~/lib/signal/result-schema";
import { StartStopCaution } from "./caution-note";
import { EmptyState, tableClass, tdClass, TableHead } from "./page";
import { ScrollArea } from "./scroll-area";

const COLUMNS = [
  "Event",
  "Time, s",
  "Resonance speed, rpm",
  "Peak amplification, dB",
  "Time near resonance (±10 %), s",
  "Peak gearbox-input angular acceleration, rad/s²",
  "Twist peak-to-peak, °",
  "End-stop margin, °",
];

/**
 * "Starts and stops": each engine start and stop the analysis found, with the damper's figures
 * in it and the margin of its twist to the vehicle's travel limit (a warning within 10 %).
 * `events` null: the analysis was made before events were found.
 */
export function StartStopTable({
  events,
  travelLimitDeg,
  editHref,
}: {
  events: TransientEvent[] | null;
  travelLimitDeg: number | null;
  /** The vehicle's edit page, for those who may set the travel limit (engineers). */
  editHref?: string;
}) {
  const names = events ? eventNames(events) : [];
  const margins = (events ?? []).map((e) =>
    travelLimitDeg === null ? null : endStopMargin(e.twistPeakToPeakDeg, travelLimitDeg),
  );
  const near = (events ?? []).flatMap((e, i) => (margins[i]?.warn ? [{ e, name: names[i]! }] : []));
  return (
    <section
      aria-labelledby="starts-stops-title"
      data-panel="starts-and-stops"
      className="space-y-3 rounded-lg border border-neutral-200 bg-white p-4 shadow-xs sm:p-6"
    >
      <h3 id="starts-stops-title" className="text-base font-semibold">
        Starts and stops
      </h3>
      {events === null ? (
        <EmptyState>
          This analysis was made before engine starts and stops were found: re-analyse the drive log
          to list them.
        </EmptyState>
      ) : events.length === 0 ? (
        <EmptyState>No engine start or stop was found in this drive log.</EmptyState>
      ) : (
        <>
          <p className="text-sm text-neutral-600">
            Each time the engine passes its damper&apos;s resonance below idle. Resonance speed: the
            engine speed of least isolation in the event; amplification: how much more the gearbox
            input swings than the crank there; twist: the angle between the damper&apos;s two sides,
            its slow drift removed.
          </p>
          <ScrollArea label="Starts and stops">
            <table className={tableClass}>
              <caption className="sr-only">
                Engine starts and stops with the damper&apos;s figures in each
              </caption>
              <TableHead columns={COLUMNS} />
              <tbody className="tabular-nums">
                {events.map((e, i) => (
                  <EventRow
                    key={`${e.kind}-${e.startS}`}
                    event={e}
                    name={names[i]!}
                    margin={margins[i] ?? null}
                  />
                ))}
              </tbody>
            </table>
          </ScrollArea>
          {near.length ? (
            <p
              role="note"
              data-warning="end-stop"
              className="rounded-md border border-amber-500 bg-amber-50 px-4 py-2 text-sm text-amber-950"
            >
              {near
                .map(
                  ({ e, name }) =>
                    `${name} comes within 10 % of the damper's travel limit of ${degreesText(travelLimitDeg)}: ${degreesText(e.twistPeakToPeakDeg)} peak-to-peak twist.`,
                )
                .join(" ")}{" "}
              The damper may reach its end stops here; check it on the vehicle.
            </p>
          ) : null}
          {travelLimitDeg === null ? (
            <p className="text-sm text-neutral-600" data-note="no-travel-limit">
              This vehicle has no damper travel limit set, so no end-stop margin is given.{" "}
              {editHref ? (
                <Link to={editHref} className="font-medium text-indigo-700 underline">
                  Set the travel limit on the vehicle
                </Link>
              ) : (
                "An engineer of the team can set it on the vehicle."
              )}
            </p>
          ) : (
            <p className="text-xs text-neutral-600">
              End-stop margin: the travel limit ({degreesText(travelLimitDeg)}) minus the
              event&apos;s peak-to-peak twist, taken from one side because the speed sensors cannot
              show where the damper rests.
            </p>
          )}
          <StartStopCaution />
        </>
      )}
    </section>
  );
}

function EventRow({
  event: e,
  name,
  margin,
}: {
  event: TransientEvent;
  name: string;
  margin: { marginDeg: number; warn: boolean } | null;
}) {
  const unresolved = <span className="text-neutral-500">not resolved</span>;
  return (
    <tr data-event={e.kind}>
      <th scope="row" className={`${tdClass} font-medium text-neutral-900`}>
        {name}
      </th>
      <td className={`${tdClass} whitespace-nowrap`}>
        {secondsNumber(e.startS)}–{secondsNumber(e.endS)}
      </td>
      <td className={tdClass}>
        {e.resonanceRpm === null ? unresolved : rpmNumber(e.resonanceRpm)}
      </td>
      <td className={tdClass}>
        {e.peakAmplificationDb === null ? unresolved : dbNumber(e.peakAmplificationDb)}
      </td>
      <td className={tdClass}>
        {e.timeNearResonanceS === null ? unresolved : secondsNumber(e.timeNearResonanceS)}
      </td>
      <td className={tdClass}>{radS2Number(e.peakGearboxAngAccelRadS2)}</td>
      <td className={tdClass}>{degreesNumber(e.twistPeakToPeakDeg)}</td>
      <td className={`${tdClass} ${margin?.warn ? "font-semibold text-red-700" : ""}`}>
        {margin === null ? (
          <span className="text-neutral-500">no limit set</span>
        ) : margin.warn ? (
          <>
            <span aria-hidden="true">⚠ </span>
            {degreesNumber(margin.marginDeg)}
            <span className="sr-only"> (within 10 % of the travel limit)</span>
          </>
        ) : (
          degreesNumber(margin.marginDeg)
        )}
      </td>
    </tr>
  );
}
