/**
 * Reads a PDF back with pdfjs-dist, Mozilla's independent PDF reader (npm), for the report's
 * tests: per page the text items as the reader extracts them and the drawing operators, plus the
 * document's metadata. Nothing of the renderer is used here.
 */
export interface ReadPage {
  /** The text items in drawing order, as pdfjs extracts them. */
  items: string[];
  /** The items joined by spaces, for "contains" checks. */
  text: string;
  /** Names of the operators drawn on the page (pdfjs' OPS names). */
  ops: string[];
}

export interface ReadPdf {
  pages: ReadPage[];
  info: Record<string, unknown>;
}

export async function readPdf(bytes: Buffer): Promise<ReadPdf> {
  const pdfjs = await import("pdfjs-dist/legacy/build/pdf.mjs");
  const opName = new Map(Object.entries(pdfjs.OPS).map(([name, code]) => [code, name]));
  const doc = await pdfjs.getDocument({
    data: new Uint8Array(bytes),
    verbosity: 0, // errors only: every font is embedded, nothing to look up
    isEvalSupported: false,
    useSystemFonts: false,
  }).promise;
  const pages: ReadPage[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const page = await doc.getPage(i);
    const content = await page.getTextContent();
    const items = content.items.flatMap((it) => ("str" in it && it.str.trim() ? [it.str] : []));
    const list = await page.getOperatorList();
    pages.push({
      items,
      text: items.join(" "),
      ops: list.fnArray.map((code) => opName.get(code) ?? String(code)),
    });
  }
  const meta = await doc.getMetadata();
  await doc.destroy();
  return { pages, info: meta.info as Record<string, unknown> };
}
