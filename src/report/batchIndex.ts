import type { Verdict } from "../compare/complianceCheck.js";
import { stamp, STYLE, shortHash } from "./reportPage.js";
import { escapeXml as esc } from "./svgPlot.js";

/** One recording of a batch, as its index row shows it. */
export interface BatchEntry {
  file: string;
  sha256: string;
  verdict: Verdict;
  /** The report's file name inside the report folder (the link). */
  report: string;
  channels: string;
}

/** The file name of the batch index inside `--report-dir` (not index.html, which a recording called index would take). */
export const BATCH_INDEX_NAME = "psdgate-batch.html";

/** BATCH_INDEX_NAME, or psdgate-batch-2.html, -3, … when a report of the batch already has that name. */
export function batchIndexName(reportNames: readonly string[]): string {
  const taken = new Set(reportNames.map((n) => n.toLowerCase()));
  let name = BATCH_INDEX_NAME;
  for (let i = 2; taken.has(name.toLowerCase()); i++) name = `psdgate-batch-${i}.html`;
  return name;
}

/**
 * `check --report-dir DIR` also writes an index of the batch: one row per recording with its verdict,
 * short hash and a link to its report; the recordings that could not be read are counted. The page
 * has the reports' Content-Security-Policy and no scripts.
 */
export function batchIndexHtml(entries: BatchEntry[], failed: number, profile: { title: string; file: string; sha256: string }, version: string, when: Date): string {
  const sorted = [...entries].sort((a, b) => a.file.localeCompare(b.file));
  const count = (v: Verdict) => entries.filter((e) => e.verdict === v).length;
  const rows = sorted.map((e) => `<tr><td><a href="${esc(encodeURI(e.report))}">${esc(e.file)}</a></td><td class="hash">${shortHash(e.sha256)}</td><td><span class="chip ${e.verdict}">${e.verdict.toUpperCase()}</span></td><td>${esc(e.channels)}</td></tr>`).join("\n");
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="generator" content="psdgate ${esc(version)}">
<title>Batch: ${esc(profile.title)}</title>
<style>@page { size: auto; margin: 17mm 12mm 15mm; @bottom-right { content: "page " counter(page) " of " counter(pages); font: 8pt Arial, sans-serif; } }${STYLE}</style></head>
<body>
<h1>Batch checked against “${esc(profile.title)}”</h1>
<div class="muted">${entries.length + failed} recordings, computed by psdgate ${esc(version)} on ${esc(stamp(when))}; profile ${esc(profile.file)} <span class="hash">${shortHash(profile.sha256)}</span>.</div>
<p id="counts">${count("pass")} pass, ${count("fail")} fail, ${count("inconclusive")} inconclusive${failed ? `, ${failed} could not be read (see the command's messages; no report)` : ""}.</p>
<table class="grid" id="batch"><thead><tr><th>recording (its report)</th><th>SHA-256</th><th>verdict</th><th>channels</th></tr></thead><tbody>
${rows}
</tbody></table>
</body></html>
`;
}
