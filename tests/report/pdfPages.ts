import { spawnSync } from "node:child_process";

/**
 * Reads a printed PDF back, page by page, with poppler's pdftotext: each page's text (-layout) and
 * how far down its body text reaches (-bbox: word boxes in points), for the page-identity and
 * half-empty-page checks of the report tests.
 */
export interface PrintedPage {
  text: string;
  /** Fraction of the body area (inside the page margins) above the lowest body word: 1 = full. */
  fill: number;
}

export function havePdftotext(): boolean {
  return spawnSync("pdftotext", ["-v"]).status === 0;
}

/** Margins in mm as the report's @page rule sets them (top, bottom): words there are the running header/footer. */
export function printedPages(pdf: Buffer, marginsMm: { top: number; bottom: number }): PrintedPage[] {
  const run = (args: string[]) => {
    const r = spawnSync("pdftotext", [...args, "-", "-"], { input: pdf, maxBuffer: 64 << 20 });
    if (r.status !== 0) throw new Error(`pdftotext failed: ${r.stderr} ${r.error} ${r.signal}`);
    return r.stdout.toString("utf8");
  };
  const texts = run(["-layout"]).split("\f").slice(0, -1);
  const bbox = run(["-bbox"]);
  const pages: PrintedPage[] = [];
  const pt = 72 / 25.4;
  for (const m of bbox.matchAll(/<page width="([\d.]+)" height="([\d.]+)">([\s\S]*?)<\/page>/g)) {
    const h = Number(m[2]);
    const top = marginsMm.top * pt;
    const bottom = h - marginsMm.bottom * pt;
    let lowest = top;
    for (const w of m[3]!.matchAll(/yMin="([\d.]+)" xMax="[\d.]+" yMax="([\d.]+)"/g)) {
      const y0 = Number(w[1]);
      const y1 = Number(w[2]);
      if (y0 >= top - 1 && y1 <= bottom + 1) lowest = Math.max(lowest, y1);
    }
    pages.push({ text: texts[pages.length] ?? "", fill: (lowest - top) / (bottom - top) });
  }
  return pages;
}
