import {
  damperLabels,
  RATTLE_LIMIT_SOURCE,
  transmissionLabels,
  type DamperType,
  type Fuel,
  type IngestMapping,
  type TransmissionType,
} from "~/lib/domain/drive-log-terms";
import { Card } from "./page";
import { fuelLabels } from "./vehicle-form";

/** The vehicle's data, every figure with its unit (docs/ui.md, vehicle page item 1). */
export function VehicleCard({
  vehicle: v,
}: {
  vehicle: {
    /** The firing order the analyses use (override, or z/2 / z). */
    firingOrder: number;
    cylinders: number;
    stroke: number;
    fuel: Fuel;
    idleRpm: number;
    firingOrderOverride: number | null;
    transmissionType: TransmissionType;
    gearRatios: number[];
    damperType: DamperType;
    damperVariant: string;
    primaryInertiaKgM2: number | null;
    secondaryInertiaKgM2: number | null;
    springRateNmPerDeg: number | null;
    damperTravelLimitDeg?: number | null;
    rattleLimitRadS2: number;
    columnMapping: IngestMapping | null;
    notes: string;
  };
}) {
  const order = v.firingOrder;
  const damperExtras = [
    v.primaryInertiaKgM2 !== null ? `primary ${v.primaryInertiaKgM2} kg·m²` : null,
    v.secondaryInertiaKgM2 !== null ? `secondary ${v.secondaryInertiaKgM2} kg·m²` : null,
    v.springRateNmPerDeg !== null ? `spring rate ${v.springRateNmPerDeg} N·m/°` : null,
    v.damperTravelLimitDeg != null ? `travel limit ${v.damperTravelLimitDeg}° stop to stop` : null,
  ].filter(Boolean);
  const mapping = v.columnMapping ? mappingText(v.columnMapping) : "";
  return (
    <Card title="Vehicle" id="vehicle">
      <dl className="grid gap-x-8 gap-y-4 text-sm sm:grid-cols-2 lg:grid-cols-5">
        <Item term="Engine">
          {v.cylinders} cylinders, {v.stroke === 2 ? "two" : "four"}-stroke,{" "}
          {fuelLabels[v.fuel].toLowerCase()}; idle {v.idleRpm} rpm
        </Item>
        <Item term="Firing order">
          order {order}{" "}
          <span className="text-neutral-500">
            {v.firingOrderOverride !== null
              ? "(set for this vehicle)"
              : v.stroke === 2
                ? "(z, two-stroke)"
                : "(z/2, four-stroke)"}
          </span>
        </Item>
        <Item term="Transmission">
          {transmissionLabels[v.transmissionType]}
          {v.gearRatios.length ? (
            <span className="block text-neutral-500">ratios {v.gearRatios.join(" · ")}</span>
          ) : null}
        </Item>
        <Item term="Damper fitted">
          {damperLabels[v.damperType]}, variant {v.damperVariant}
          {damperExtras.length ? (
            <span className="block text-neutral-500">{damperExtras.join(", ")}</span>
          ) : null}
        </Item>
        <Item term="Rattle limit">
          {v.rattleLimitRadS2} rad/s²
          <span className="block text-xs text-neutral-500">{RATTLE_LIMIT_SOURCE}</span>
        </Item>
        {mapping ? (
          <Item term="Column mapping" wide>
            {mapping} <span className="text-neutral-500">(used for this vehicle's uploads)</span>
          </Item>
        ) : null}
        {v.notes ? (
          <Item term="Notes" wide>
            <span className="whitespace-pre-line">{v.notes}</span>
          </Item>
        ) : null}
      </dl>
    </Card>
  );
}

function Item({
  term,
  children,
  wide,
}: {
  term: string;
  children: React.ReactNode;
  wide?: boolean;
}) {
  return (
    <div className={wide ? "sm:col-span-2 lg:col-span-5" : undefined}>
      <dt className="font-medium text-neutral-500">{term}</dt>
      <dd className="mt-0.5 text-neutral-900">{children}</dd>
    </div>
  );
}

/** "time: t [ms] (ms), crank: … (rpm), gearbox: …" — only the parts that were chosen. */
export function mappingText(m: IngestMapping): string {
  const part = (name: string, column?: string, unit?: string) =>
    column || unit ? `${name}: ${column ?? "recognised"}${unit ? ` (${unit})` : ""}` : null;
  return [
    part("time", m.timeColumn, m.timeUnit),
    part("crank", m.crankColumn, m.crankUnit),
    part("gearbox", m.gearboxColumn, m.gearboxUnit),
  ]
    .filter(Boolean)
    .join("; ");
}
