import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { MemoryRouter } from "react-router";
import { describe, expect, it } from "vitest";
import type { TransientEvent } from "~/lib/signal/result-schema";
import { StartStopTable } from "./start-stop-table";

// The "Starts and stops" panel rendered on the server with constructed events. The end-stop rule
// is issue 15's: a warning when an event's twist comes within 10 % of the travel limit; with a
// 30° limit, 28° peak-to-peak leaves 2°, inside the 3° (10 %) worked out by hand.
const stop: TransientEvent = {
  kind: "stop",
  startS: 20,
  endS: 23.4,
  resonanceRpm: 386,
  peakAmplificationDb: 10.94,
  timeNearResonanceS: 0.46,
  peakGearboxAngAccelRadS2: 1234.4,
  twistPeakToPeakDeg: 28,
};
const start: TransientEvent = {
  ...stop,
  kind: "start",
  startS: 1,
  endS: 8,
  twistPeakToPeakDeg: 12,
  resonanceRpm: null,
};

function html(props: Parameters<typeof StartStopTable>[0]): string {
  return renderToStaticMarkup(
    createElement(MemoryRouter, null, createElement(StartStopTable, props)),
  );
}

describe("the Starts and stops panel", () => {
  it("lists each event with its figures and warns near the travel limit", () => {
    const page = html({ events: [start, stop], travelLimitDeg: 30 });
    expect(page).toContain(">Start</th>");
    expect(page).toContain(">Stop</th>");
    // Figures by format.ts's rules: rpm whole, dB 1 decimal, s 1 decimal, rad/s² whole, ° 1 decimal.
    expect(page).toContain('<td class="border-b border-neutral-100 py-2.5 pr-4">386</td>');
    expect(page).toContain(">10.9<");
    expect(page).toContain(">0.5<");
    expect(page).toContain(">1234<");
    expect(page).toContain("not resolved");
    // Margins: 30 − 12 = 18.0° (no warning), 30 − 28 = 2.0° (warning).
    expect(page).toContain(">18.0<");
    expect(page).toMatch(/⚠ <\/span>2\.0/);
    expect(page).toContain("Stop comes within 10 % of the damper&#x27;s travel limit of 30.0°");
    expect(page).not.toContain("Start comes within");
  });

  it("says when the vehicle has no travel limit, with a link for those who may set it", () => {
    const engineer = html({ events: [stop], travelLimitDeg: null, editHref: "/vehicles/7/edit" });
    expect(engineer).toContain("This vehicle has no damper travel limit set");
    expect(engineer).toContain('href="/vehicles/7/edit"');
    expect(engineer).not.toContain("data-warning");
    const viewer = html({ events: [stop], travelLimitDeg: null });
    expect(viewer).not.toContain("/edit");
    expect(viewer).toContain("An engineer of the team can set it");
  });

  it("has an empty state for no events and for analyses made before events existed", () => {
    expect(html({ events: [], travelLimitDeg: 30 })).toContain("No engine start or stop was found");
    expect(html({ events: null, travelLimitDeg: 30 })).toContain("re-analyse the drive log");
  });
});
