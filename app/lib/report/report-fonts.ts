/**
 * The report's type: Inter (the app's font, shipped by @fontsource/inter, never fetched), in
 * its latin and latin-ext subsets, regular (400) and semibold (600). The subsets lack some
 * glyphs ("≥", "→", Greek letters, CJK …), which pdfkit would draw as blanks. Every string
 * therefore goes through `textRuns`: each character is drawn from the first subset that has it,
 * a few signs are spelled out (≥ → ">="), and anything else becomes "?" — never a silent blank.
 * Coverage is read from the font files themselves with fontkit (the copy pdfkit uses).
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { inflateSync } from "node:zlib";
import { Lru } from "../base/lru";

const require = createRequire(import.meta.url);

export type FontFace = "regular" | "bold";
type Subset = "latin" | "ext";

/** pdfkit's registered names: face and subset. */
export const FONT_NAMES: Record<FontFace, Record<Subset, string>> = {
  regular: { latin: "Inter", ext: "Inter-ext" },
  bold: { latin: "Inter-Semibold", ext: "Inter-Semibold-ext" },
};

const FILES: Record<FontFace, Record<Subset, string>> = {
  regular: {
    latin: "@fontsource/inter/files/inter-latin-400-normal.woff",
    ext: "@fontsource/inter/files/inter-latin-ext-400-normal.woff",
  },
  bold: {
    latin: "@fontsource/inter/files/inter-latin-600-normal.woff",
    ext: "@fontsource/inter/files/inter-latin-ext-600-normal.woff",
  },
};

/** A fontkit font: what the coverage check needs; pdfkit takes the object as it is. */
export interface GlyphFont {
  hasGlyphForCodePoint(codePoint: number): boolean;
  layout(text: string): unknown;
}

interface LoadedFace {
  /** The fonts, parsed once; pdfkit's registerFont takes them directly. */
  fonts: Record<Subset, GlyphFont>;
}

/**
 * The TrueType (sfnt) font inside a WOFF 1.0 file (W3C, WOFF File Format 1.0, §4–5): each table
 * zlib-compressed when its compressed length is shorter than its original one. Unpacked once,
 * because fontkit reading a WOFF inflates the glyph table anew for every document it embeds in.
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.toString("latin1", 0, 4) !== "wOFF") throw new Error("not a WOFF 1.0 font");
  const flavor = woff.readUInt32BE(4);
  const count = woff.readUInt16BE(12);
  const tables = Array.from({ length: count }, (_, i) => {
    const at = 44 + 20 * i;
    const offset = woff.readUInt32BE(at + 4);
    const compLength = woff.readUInt32BE(at + 8);
    const origLength = woff.readUInt32BE(at + 12);
    const raw = woff.subarray(offset, offset + compLength);
    return {
      tag: woff.subarray(at, at + 4),
      checksum: woff.readUInt32BE(at + 16),
      data: compLength < origLength ? inflateSync(raw) : raw,
    };
  });
  const pad4 = (n: number) => (n + 3) & ~3;
  const headerLength = 12 + 16 * count;
  const size = tables.reduce((s, t) => s + pad4(t.data.length), headerLength);
  const out = Buffer.alloc(size);
  const power = 2 ** Math.floor(Math.log2(count));
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(count, 4);
  out.writeUInt16BE(power * 16, 6);
  out.writeUInt16BE(Math.log2(power), 8);
  out.writeUInt16BE(count * 16 - power * 16, 10);
  let offset = headerLength;
  tables.forEach((t, i) => {
    const at = 12 + 16 * i;
    t.tag.copy(out, at);
    out.writeUInt32BE(t.checksum, at + 4);
    out.writeUInt32BE(offset, at + 8);
    out.writeUInt32BE(t.data.length, at + 12);
    t.data.copy(out, offset);
    offset += pad4(t.data.length);
  });
  return out;
}

let loaded: Record<FontFace, LoadedFace> | null = null;

/** The font files' bytes and glyph tables, read once per process. */
export function reportFonts(): Record<FontFace, LoadedFace> {
  if (loaded) return loaded;
  // fontkit is pdfkit's own dependency: resolve it from pdfkit so both read fonts alike.
  const fontkit = createRequire(require.resolve("pdfkit"))("fontkit") as {
    create(buffer: Buffer): GlyphFont;
  };
  const open = (file: string) =>
    withLayoutCache(fontkit.create(woffToSfnt(readFileSync(require.resolve(file)))));
  const face = (files: Record<Subset, string>): LoadedFace => ({
    fonts: { latin: open(files.latin), ext: open(files.ext) },
  });
  loaded = { regular: face(FILES.regular), bold: face(FILES.bold) };
  return loaded;
}

interface Run {
  positions: Record<string, number>[];
}

/**
 * The font with its shaping remembered across documents: pdfkit shapes word by word through
 * font.layout and caches per document only, and shaping (Inter's contextual alternates) is most
 * of a report's time. pdfkit scales the positions of each run it gets, so every caller receives
 * its own copy of the positions; the glyphs are shared and only read.
 */
function withLayoutCache<F extends GlyphFont>(font: F): F {
  const cache = new Lru<string, Run>(50_000);
  const layout = font.layout.bind(font) as (text: string, features?: unknown) => Run;
  const copy = (run: Run): Run => {
    const out = Object.create(Object.getPrototypeOf(run) as object) as Run;
    Object.assign(out, run);
    out.positions = run.positions.map((p) => ({ ...p }));
    return out;
  };
  return Object.assign(Object.create(font) as F, {
    layout(text: string, features?: unknown): Run {
      if (features !== undefined) return layout(text, features);
      let run = cache.get(text);
      if (!run) {
        run = copy(layout(text));
        cache.set(text, run);
      }
      return copy(run);
    },
  });
}

/** Signs the subsets lack, spelled with signs they have. */
const SPELLED: Record<string, string> = {
  "≥": ">=",
  "≤": "<=",
  "≠": "!=",
  "≈": "~",
  "→": "->",
  "←": "<-",
  ω: "omega",
  α: "alpha",
  π: "pi",
  Δ: "delta",
  ζ: "zeta",
  "\t": " ",
};

/** A stretch of text drawn with one registered font. */
export interface TextRun {
  font: string;
  text: string;
}

const subsetOf = (face: LoadedFace, cp: number): Subset | null =>
  face.fonts.latin.hasGlyphForCodePoint(cp)
    ? "latin"
    : face.fonts.ext.hasGlyphForCodePoint(cp)
      ? "ext"
      : null;

/**
 * `text` as runs of one font each, every character covered: from the latin subset if it has
 * it, else latin-ext, else spelled out (SPELLED) or, failing that, "?". Line breaks are kept;
 * other control characters are dropped.
 */
export function textRuns(text: string, face: FontFace): TextRun[] {
  const f = reportFonts()[face];
  const runs: TextRun[] = [];
  const push = (subset: Subset, s: string) => {
    const font = FONT_NAMES[face][subset];
    const last = runs[runs.length - 1];
    if (last && last.font === font) last.text += s;
    else runs.push({ font, text: s });
  };
  for (const ch of text.normalize("NFC")) {
    const cp = ch.codePointAt(0)!;
    if (ch === "\n") {
      push(runs.at(-1)?.font === FONT_NAMES[face].ext ? "ext" : "latin", ch);
      continue;
    }
    if (cp < 0x20 && ch !== "\t") continue;
    const subset = subsetOf(f, cp);
    if (subset) push(subset, ch);
    else push("latin", SPELLED[ch] ?? "?"); // SPELLED holds ASCII only
  }
  return runs;
}

/** `text` with every uncovered character replaced as `textRuns` does (one string). */
export function coveredText(text: string, face: FontFace = "regular"): string {
  return textRuns(text, face)
    .map((r) => r.text)
    .join("");
}
