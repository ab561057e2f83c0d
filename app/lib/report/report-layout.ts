/**
 * The evidence report's page frame and text flow on top of pdfkit: A4 portrait, a header on
 * every page (vehicle, damper variant, programme, state, date), the "draft" watermark when the
 * report is one, a footer with "Page i of n", the software version, the sign-off and its digest,
 * and the helpers every page uses — headings, paragraphs that wrap, tables that continue on the
 * next page with their header row. All text goes through report-fonts' textRuns, so no glyph is
 * ever missing.
 */
import PDFDocument from "pdfkit";
import { FONT_NAMES, reportFonts, textRuns, type FontFace } from "./report-fonts";

/** A4 in PDF points (ISO 216: 210 × 297 mm; 1 pt = 1/72 in). */
export const PAGE = { width: 595.28, height: 841.89 } as const;
export const MARGIN = { left: 48, right: 48, top: 92, bottom: 64 } as const;
export const CONTENT_WIDTH = PAGE.width - MARGIN.left - MARGIN.right;
export const CONTENT_BOTTOM = PAGE.height - MARGIN.bottom;

/** The product's colours (docs/ui.md), the app's Tailwind theme values as sRGB. */
export const COLOURS = {
  crank: "#e17100", // amber-600
  gearbox: "#009689", // teal-600
  isolation: "#4f39f6", // indigo-600
  pass: "#00a63e", // green-600
  fail: "#e7000b", // red-600
  warning: "#fe9a00", // amber-500
  text: "#262626", // neutral-800
  muted: "#525252", // neutral-600
  rule: "#d4d4d4", // neutral-300
  grid: "#e5e5e5", // neutral-200
  band: "#f5f5f5", // neutral-100
  zero: "#737373", // neutral-500
} as const;

export interface FrameText {
  /** Header, left: "KST-D4 · Kestrel estate", then "Damper variant: …". */
  vehicle: string;
  variant: string;
  programme: string;
  state: string;
  date: string;
  /** Footer, left: software version, sign-off and digest. */
  footer: string;
  /** Draw the "DRAFT" watermark on every page. */
  draft: boolean;
}

export interface TextOptions {
  face?: FontFace;
  size?: number;
  colour?: string;
  width?: number;
  align?: "left" | "right" | "center";
  /** Extra space after the paragraph, pt. */
  after?: number;
  lineGap?: number;
}

/** Every run of text drawn and its registered font (the glyph-coverage test; null otherwise). */
export type TextRecorder = ((text: string, font: string) => void) | null;

export class ReportDoc {
  readonly pdf: PDFKit.PDFDocument;
  private readonly frame: FrameText;
  private readonly recorder: TextRecorder;

  constructor(
    frame: FrameText,
    info: { title: string; subject: string; createdAt: Date },
    recorder: TextRecorder = null,
  ) {
    this.frame = frame;
    this.recorder = recorder;
    this.pdf = new PDFDocument({
      size: "A4",
      // The watermark and tints use transparency, a PDF 1.4 feature; pdfkit writes 1.3 by default.
      pdfVersion: "1.7",
      margins: MARGIN,
      bufferPages: true,
      autoFirstPage: false,
      info: {
        Title: info.title,
        Subject: info.subject,
        Author: "Twistlog",
        Creator: "Twistlog",
        Producer: "Twistlog (pdfkit)",
        CreationDate: info.createdAt,
        ModDate: info.createdAt,
      },
      lang: "en",
      displayTitle: true,
    });
    const fonts = reportFonts();
    for (const face of ["regular", "bold"] as const) {
      // pdfkit takes a parsed fontkit font as it is (PDFFontFactory.open), so each is parsed once.
      this.pdf.registerFont(FONT_NAMES[face].latin, fonts[face].fonts.latin as never);
      this.pdf.registerFont(FONT_NAMES[face].ext, fonts[face].fonts.ext as never);
    }
    this.pdf.on("pageAdded", () => this.drawPageTop());
  }

  get y(): number {
    return this.pdf.y;
  }
  set y(value: number) {
    this.pdf.y = value;
  }

  newPage(): void {
    this.pdf.addPage();
  }

  /** Starts a new page unless `height` pt still fit above the footer. */
  ensure(height: number): void {
    if (this.pdf.y + height > CONTENT_BOTTOM) this.newPage();
  }

  /** Height of `text` set at `width` (pt) with the options. */
  heightOf(text: string, o: TextOptions = {}): number {
    const face = o.face ?? "regular";
    this.pdf.font(FONT_NAMES[face].latin).fontSize(o.size ?? 9);
    const plain = textRuns(text, face)
      .map((r) => r.text)
      .join("");
    return this.pdf.heightOfString(plain, {
      width: o.width ?? CONTENT_WIDTH,
      lineGap: o.lineGap ?? 1.5,
    });
  }

  /**
   * Draws `text` at (x, y) wrapped to `width`, in runs of covered glyphs (report-fonts), and
   * leaves the cursor under it. Wrapping past the page bottom continues on a new page.
   */
  text(text: string, x: number, y: number, o: TextOptions = {}): void {
    const face = o.face ?? "regular";
    const runs = textRuns(text, face);
    for (const run of runs) this.recorder?.(run.text, run.font);
    const pdf = this.pdf;
    pdf
      .fontSize(o.size ?? 9)
      .fillColor(o.colour ?? COLOURS.text)
      .fillOpacity(1);
    if (runs.length === 0) return;
    runs.forEach((run, i) => {
      pdf.font(run.font);
      const options = {
        width: o.width ?? CONTENT_WIDTH,
        align: o.align ?? "left",
        lineGap: o.lineGap ?? 1.5,
        continued: i < runs.length - 1,
      } as const;
      if (i === 0) pdf.text(run.text, x, y, options);
      else pdf.text(run.text, options);
    });
    pdf.y += o.after ?? 0;
  }

  /** A paragraph at the left margin, under the cursor. */
  para(text: string, o: TextOptions = {}): void {
    this.text(text, MARGIN.left, this.pdf.y, { after: 4, ...o });
  }

  /** A heading that never sits alone at a page's foot (`keep` pt of what follows stay with it). */
  heading(text: string, level: 1 | 2 | 3 = 2, keep = 60): void {
    const size = level === 1 ? 17 : level === 2 ? 12.5 : 10;
    this.ensure(this.heightOf(text, { face: "bold", size }) + keep);
    if (level === 1) this.pdf.y += 2;
    else this.pdf.y += level === 2 ? 8 : 5;
    this.text(text, MARGIN.left, this.pdf.y, { face: "bold", size, after: level === 1 ? 6 : 3 });
  }

  /** A thin rule across the content width under the cursor. */
  rule(colour: string = COLOURS.rule): void {
    const y = this.pdf.y + 2;
    this.pdf
      .moveTo(MARGIN.left, y)
      .lineTo(PAGE.width - MARGIN.right, y)
      .lineWidth(0.5)
      .strokeColor(colour)
      .stroke();
    this.pdf.y = y + 4;
  }

  /** Header and watermark, drawn as each page is added; the cursor then starts under them. */
  private drawPageTop(): void {
    const pdf = this.pdf;
    const f = this.frame;
    // A paragraph that wraps onto a new page continues after this handler in its own font and
    // colour: keep pdfkit's text state (font, size, fill) as it was.
    const state = pdf as unknown as { _font: unknown; _fontSize: number; _fillColor: unknown };
    const kept = { font: state._font, size: state._fontSize, fill: state._fillColor };
    pdf.save();
    if (f.draft) this.drawWatermark();
    const top = 30;
    const right = PAGE.width - MARGIN.right;
    const half = CONTENT_WIDTH * 0.58;
    this.text(f.vehicle, MARGIN.left, top, { face: "bold", size: 9.5, width: half, lineGap: 0 });
    this.text(`Damper variant: ${f.variant}`, MARGIN.left, pdf.y + 1, {
      size: 8.5,
      width: half,
      lineGap: 0,
    });
    this.text(`Programme: ${f.programme}`, MARGIN.left, pdf.y + 1, {
      size: 8.5,
      width: half,
      colour: COLOURS.muted,
      lineGap: 0,
    });
    const rx = MARGIN.left + half + 8;
    const rw = right - rx;
    this.text(f.state, rx, top, { face: "bold", size: 9.5, width: rw, align: "right", lineGap: 0 });
    this.text(f.date, rx, pdf.y + 1, { size: 8.5, width: rw, align: "right", lineGap: 0 });
    this.text("Twistlog evidence report", rx, pdf.y + 1, {
      size: 8.5,
      width: rw,
      align: "right",
      colour: COLOURS.muted,
      lineGap: 0,
    });
    const ruleY = MARGIN.top - 14;
    pdf.moveTo(MARGIN.left, ruleY).lineTo(right, ruleY).lineWidth(0.75).strokeColor(COLOURS.rule);
    pdf.stroke();
    pdf.restore();
    state._font = kept.font;
    state._fontSize = kept.size;
    state._fillColor = kept.fill;
    pdf.x = MARGIN.left;
    pdf.y = MARGIN.top;
  }

  /** "DRAFT", big, light and diagonal, behind the page's content. */
  private drawWatermark(): void {
    const pdf = this.pdf;
    pdf.save();
    pdf.rotate(-50, { origin: [PAGE.width / 2, PAGE.height / 2] });
    pdf.font(FONT_NAMES.bold.latin).fontSize(150).fillColor(COLOURS.zero).fillOpacity(0.1);
    this.recorder?.("DRAFT", FONT_NAMES.bold.latin);
    const w = pdf.widthOfString("DRAFT");
    pdf.text("DRAFT", PAGE.width / 2 - w / 2, PAGE.height / 2 - 75, {
      lineBreak: false,
      width: w + 10,
    });
    pdf.restore();
    pdf.fillOpacity(1);
  }

  /** The footers, once every page exists ("Page i of n"). */
  private drawFooters(): void {
    const pdf = this.pdf;
    const range = pdf.bufferedPageRange();
    for (let i = range.start; i < range.start + range.count; i++) {
      pdf.switchToPage(i);
      const bottom = pdf.page.margins.bottom;
      pdf.page.margins.bottom = 0; // writing in the margin must not start a page
      const y = PAGE.height - 44;
      pdf
        .moveTo(MARGIN.left, y - 6)
        .lineTo(PAGE.width - MARGIN.right, y - 6)
        .lineWidth(0.5)
        .strokeColor(COLOURS.rule)
        .stroke();
      const half = CONTENT_WIDTH - 90;
      this.text(this.frame.footer, MARGIN.left, y, {
        size: 7.5,
        colour: COLOURS.muted,
        width: half,
        lineGap: 0.5,
      });
      this.text(`Page ${i + 1} of ${range.count}`, PAGE.width - MARGIN.right - 90, y, {
        size: 8,
        face: "bold",
        width: 90,
        align: "right",
      });
      pdf.page.margins.bottom = bottom;
    }
  }

  /** Draws the footers and returns the finished PDF's bytes. */
  async finish(): Promise<Buffer> {
    this.drawFooters();
    const chunks: Buffer[] = [];
    const done = new Promise<Buffer>((resolve, reject) => {
      this.pdf.on("data", (c: Buffer) => chunks.push(c));
      this.pdf.on("end", () => resolve(Buffer.concat(chunks)));
      this.pdf.on("error", reject);
    });
    this.pdf.end();
    return done;
  }
}
