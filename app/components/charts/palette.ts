/**
 * Colours of the charts. Meaning colours follow docs/ui.md (crank side amber-600, gearbox side
 * teal-600, isolation indigo-600, pass green-600, fail red-600) as the app's Tailwind theme
 * defines them (oklch, so canvas and CSS show the same colour).
 */
export const COLOURS = {
  crank: "oklch(66.6% 0.179 58.318)",
  gearbox: "oklch(60% 0.118 184.704)",
  isolation: "oklch(51.1% 0.262 276.966)",
  pass: "oklch(62.7% 0.194 149.214)",
  fail: "oklch(57.7% 0.245 27.325)",
  failFill: "oklch(57.7% 0.245 27.325 / 0.1)",
  text: "oklch(26.9% 0 0)", // neutral-800
  axis: "oklch(43.9% 0 0)", // neutral-600
  grid: "oklch(92.2% 0 0)", // neutral-200
  zero: "oklch(55.6% 0 0)", // neutral-500
  marker: "oklch(37.1% 0 0)", // neutral-700
  bandA: "oklch(97% 0 0)", // neutral-100
  bandB: "oklch(98.5% 0 0)", // neutral-50
  // Issue 15, our own choices: engine starts and stops (fuchsia-700), the twist angle (sky-700).
  event: "oklch(51.8% 0.253 323.949)",
  eventFill: "oklch(51.8% 0.253 323.949 / 0.07)",
  twist: "oklch(50% 0.134 242.749)",
} as const;

/**
 * Several drive logs in one chart: the Okabe–Ito palette (Okabe & Ito, "Color Universal
 * Design (CUD): how to make figures and presentations that are friendly to colorblind people",
 * 2008), without its yellow until last (too light on white), each log also with its own dash
 * pattern so colour is never the only cue.
 */
export const OVERLAY_STYLES: readonly { colour: string; dash: number[]; name: string }[] = [
  { colour: "#0072B2", dash: [], name: "blue, solid" },
  { colour: "#D55E00", dash: [8, 4], name: "vermillion, dashed" },
  { colour: "#009E73", dash: [2, 3], name: "bluish green, dotted" },
  { colour: "#CC79A7", dash: [10, 3, 2, 3], name: "reddish purple, dash-dot" },
  { colour: "#E69F00", dash: [4, 4], name: "orange, short dashes" },
  { colour: "#56B4E9", dash: [12, 4, 4, 4], name: "sky blue, long dash-dash" },
  { colour: "#000000", dash: [1, 3], name: "black, fine dots" },
  { colour: "#F0E442", dash: [6, 2, 2, 2, 2, 2], name: "yellow, dash-dot-dot" },
];

export const FONT_FAMILY = "Inter, ui-sans-serif, system-ui, sans-serif";
