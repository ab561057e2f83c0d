import { countText } from "../base/plural";

// The analysis warnings in plain sentences for the pages. The codes stay in the result JSON and
// the API (a public contract); readers see only these sentences. The sentences are built from
// the code and the figures in the stored message, so results stored before a wording change read
// the same as new ones.

export interface AnalysisWarning {
  code: string;
  message: string;
}

/** "the log spans …" → "The log spans ….": a sentence of the signal core's lower-case clause. */
function sentence(clause: string): string {
  const t = clause.trim();
  if (!t) return "";
  const s = t.charAt(0).toUpperCase() + t.slice(1);
  return /[.!?]$/.test(s) ? s : `${s}.`;
}

const firstNumber = (text: string, pattern: RegExp): number | null => {
  const m = pattern.exec(text);
  return m ? Number(m[1]) : null;
};

/** One warning as a sentence a test engineer reads without knowing the codes. */
export function warningText(w: AnalysisWarning): string {
  switch (w.code) {
    case "gearbox_near_noise": {
      const n = firstNumber(w.message, /(\d+) engine speed/);
      const where = n === null ? "At some engine speeds" : `At ${countText(n, "engine speed")}`;
      return `${where} the gearbox-input signal at the firing order is close to the sensor noise, so the isolation shown there is a lower bound: the damper isolates at least that much.`;
    }
    case "slow_blocks_dropped": {
      const n = firstNumber(w.message, /^(\d+) block/);
      const rpm = firstNumber(w.message, /below (\d+) rpm/);
      const what = n === null ? "some blocks" : countText(n, "block");
      const speed = rpm === null ? "" : ` (below ${rpm} rpm)`;
      return `Left out of the analysis: ${what} where the engine ran too slowly${speed} for an alias-free angle grid.`;
    }
    case "no_resonance":
      return `No damper resonance found. ${sentence(w.message)}`;
    case "no_model_fit":
      return `The two-mass model could not be fitted, so there is no natural frequency or damping ratio. ${sentence(w.message)}`;
    default:
      return sentence(w.message);
  }
}
