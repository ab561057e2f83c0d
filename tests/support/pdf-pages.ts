/**
 * A PDF read back by an independent reader: Mozilla's pdf.js (pdfjs-dist, legacy build for
 * Node), with its console warnings silenced (verbosity 0; a console warning fails a test here).
 * Each page's text is its text items joined with single spaces, in the order pdf.js gives them.
 */
export interface PdfPages {
  /** The page count from the document's page tree. */
  count: number;
  /** Each page's text, page 1 first; U+2212 (minus) read as "-". */
  pages: string[];
  /** The page size of page 1, in points. */
  size: { width: number; height: number };
}

export async function pdfPages(bytes: Uint8Array): Promise<PdfPages> {
  const pdfjs = await import("pdfjs-dist/legacy/build/pdf.mjs");
  const doc = await pdfjs.getDocument({
    data: new Uint8Array(bytes),
    verbosity: pdfjs.VerbosityLevel.ERRORS,
    isEvalSupported: false,
  }).promise;
  try {
    const pages: string[] = [];
    let size = { width: 0, height: 0 };
    for (let i = 1; i <= doc.numPages; i++) {
      const page = await doc.getPage(i);
      if (i === 1) {
        const [x0, y0, x1, y1] = page.view as [number, number, number, number];
        size = { width: x1 - x0, height: y1 - y0 };
      }
      const content = await page.getTextContent();
      const text = content.items
        .map((item) => ("str" in item ? item.str : ""))
        .filter((s) => s.length > 0)
        .join(" ");
      pages.push(text.replaceAll("\u2212", "-"));
    }
    return { count: doc.numPages, pages, size };
  } finally {
    await doc.destroy();
  }
}

/** Text with every run of white space removed: a hash broken over two lines reads whole. */
export const squeezed = (text: string) => text.replace(/\s+/g, "");
