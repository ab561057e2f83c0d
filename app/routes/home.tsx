import type { Route } from "./+types/home";

export const meta: Route.MetaFunction = () => [
  { title: "Twistlog — torsional damper results for NVH teams" },
];

export default function Home() {
  return (
    <div className="max-w-3xl">
      <h1 className="text-3xl font-semibold tracking-tight">
        Prove the damper works, drive log by drive log.
      </h1>
      <p className="mt-5 text-lg leading-relaxed text-neutral-700">
        Twistlog is the team workspace for driveline NVH. A calibration technician uploads a
        road-test drive log with the angular velocity at the crank and at the gearbox input; the
        server tracks the engine orders, finds the firing order and works out how many decibels of
        torsional vibration the dual-mass flywheel or clutch damper keeps out of the transmission at
        every engine speed. Results are stored per vehicle, so engineers can chart them, compare a
        damper change before and after, screen idle gear rattle against the programme&apos;s limit,
        check targets and share a result with a colleague by link.
      </p>
      <dl className="mt-10 grid gap-4 sm:grid-cols-3">
        <Fact
          colour="bg-crank"
          term="Crank side"
          text="Firing-order fluctuation the engine puts in."
        />
        <Fact
          colour="bg-gearbox"
          term="Gearbox input"
          text="What is left of it after the damper."
        />
        <Fact
          colour="bg-isolation"
          term="Isolation"
          text="20·log10(crank / gearbox) in dB, per engine speed."
        />
      </dl>
    </div>
  );
}

function Fact({ colour, term, text }: { colour: string; term: string; text: string }) {
  return (
    <div className="rounded-lg border border-neutral-200 bg-white p-4">
      <dt className="flex items-center gap-2 text-sm font-semibold">
        <span className={`inline-block h-2.5 w-2.5 rounded-full ${colour}`} aria-hidden="true" />
        {term}
      </dt>
      <dd className="mt-1 text-sm text-neutral-600">{text}</dd>
    </div>
  );
}
