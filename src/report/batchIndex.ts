import type { Verdict } from "../compare/complianceCheck.js";
import { VERDICT_CAUTION } from "./cautions.js";
import { embedResult } from "./embeddedResult.js";
import { givenRow, metaRows, reportPage, row, shortHash, signOff, type ReportContext } from "./reportPage.js";
import { escapeXml as esc } from "./svgPlot.js";

/** One recording of a batch, as its index row shows it. */
export interface BatchEntry {
  file: string;
  sha256: string;
  verdict: Verdict;
  /** The report's file name inside the report folder (the link). */
  report: string;
  /** SHA-256 of the report as written (the index's verify checks each linked report by it). */
  reportSha256?: string | undefined;
  channels: string;
  /** Why the verdict: the first reason of the worst channel ("every line within its band" on a pass). */
  reason?: string | undefined;
  /** The worst excursion in words ("412 Hz +4.1 dB, shown"), or "none". */
  worst?: string | undefined;
  /** The recording's own test identity (a meta file beside it), else the batch's --meta. */
  testId?: string | undefined;
  metaFrom?: string | undefined;
}

/**
 * The file name of the batch index inside `--report-dir` (not index.html, which a recording called index would take).
 */
export const BATCH_INDEX_NAME = "psdgate-batch.html";

/** BATCH_INDEX_NAME, or psdgate-batch-2.html, -3, … when a report of the batch already has that name. */
export function batchIndexName(reportNames: readonly string[]): string {
  const taken = new Set(reportNames.map((n) => n.toLowerCase()));
  let name = BATCH_INDEX_NAME;
  for (let i = 2; taken.has(name.toLowerCase()); i++) name = `psdgate-batch-${i}.html`;
  return name;
}

/** The batch page's own style element (verify knows it: src/verify/verifyReport.ts). */
export const BATCH_STYLE =
  "table.batch th:nth-child(1) { width: 27%; } table.batch th:nth-child(2) { width: 13%; } table.batch th:nth-child(3) { width: 32%; } table.batch th:nth-child(4) { width: 16%; } table.batch td:nth-child(1) { word-break: break-word; }";

/**
 * `check --report-dir DIR` also writes an index of the batch, itself a record: one row per recording with its
 * verdict, the reason, its worst excursion, its test id and a link to its report; the recordings that could not
 * be read are counted; the caution and a sign-off. On the shared page frame (identity, profile hash and
 * "page N of M" on every printed page) with an embedded result: `verify` checks each linked report by SHA-256.
 */
export function batchIndexHtml(
  entries: BatchEntry[],
  failed: number,
  profile: { title: string; file: string; sha256: string },
  version: string,
  when: Date,
  context: Omit<ReportContext, "version" | "when"> = {},
): string {
  const ctx: ReportContext = { ...context, version, when };
  const sorted = [...entries].sort((a, b) => a.file.localeCompare(b.file));
  const count = (v: Verdict) => entries.filter((e) => e.verdict === v).length;
  const rows = sorted
    .map(
      (e) =>
        `<tr><td><a href="${esc(encodeURI(e.report))}">${esc(e.file)}</a><br><span class="hash">${shortHash(e.sha256)}</span>${e.testId ? `<br>test ${esc(e.testId)}` : ""}</td><td><span class="chip ${e.verdict}">${e.verdict.toUpperCase()}</span></td><td>${esc(e.reason ?? "")}</td><td>${esc(e.worst ?? "")}</td><td>${esc(e.channels)}</td></tr>`,
    )
    .join("\n");
  const counts = `${count("pass")} pass, ${count("fail")} fail, ${count("inconclusive")} inconclusive${failed ? `, ${failed} could not be read (see the command's messages; no report)` : ""}`;
  const worstVerdict = count("fail") ? "fail" : count("inconclusive") || failed ? "inconclusive" : "pass";
  const metaFrom = [...new Set(sorted.map((e) => e.metaFrom).filter(Boolean))];
  const body = `<style>${BATCH_STYLE}</style>
<div class="verdict ${worstVerdict}" id="verdict" data-verdict="${worstVerdict}"><span class="word">BATCH</span><span>${esc(`${entries.length + failed} recordings against "${profile.title}": ${counts}.`)}</span></div>
<h2>Test identity</h2>
<table class="meta" id="identity">
${metaRows(ctx.meta)}
${row("Per recording", metaFrom.length ? esc(`test ids from ${metaFrom.join("; ")}`) : `<span class="muted">no meta file beside any recording and no --meta-table (RECORDING.meta.yaml or a row of the table names one recording's test)</span>`)}
</table>
<h2>Profile</h2>
<table class="meta">
${row("Profile", `${esc(profile.title)}: ${esc(profile.file)}`)}
${row("Profile SHA-256", `<span class="hash">${profile.sha256}</span>`)}
${givenRow(ctx)}
</table>
<h2>Recordings</h2>
<p id="counts">${esc(counts)}.</p>
<table class="grid batch" id="batch"><thead><tr><th>recording (its report)</th><th>verdict</th><th>reason</th><th>worst excursion</th><th>channels</th></tr></thead><tbody>
${rows}
</tbody></table>
<h2>Caution</h2>
<div class="caution keep">${esc(VERDICT_CAUTION)}</div>
${signOff(`<strong>Batch</strong>: ${esc(counts)}.`, [
  [
    "Test",
    esc(
      [ctx.meta?.testId, ctx.meta?.workOrder && `work order ${ctx.meta.workOrder}`].filter(Boolean).join(", ") ||
        "not identified (no --meta)",
    ) + (metaFrom.length ? "; per recording where its own meta file or the meta table names one (see the table)" : ""),
  ],
  ["Profile", `${esc(profile.title)} <span class="hash">${shortHash(profile.sha256)}</span>`],
  ["Operator", esc(ctx.meta?.operator ?? "not stated")],
])}`;
  const page = reportPage(
    {
      title: `Batch checked against "${profile.title}"`,
      verdictClass: worstVerdict,
      verdictWord: "BATCH",
      recordingSha256: profile.sha256,
      recordingName: profile.file.split(/[\\/]/).pop() ?? profile.file,
      kindLine: `Batch index of ${entries.length + failed} recordings`,
      body,
      hashLabel: "profile",
    },
    ctx,
  );
  return embedResult(page, {
    kind: "batch",
    created: when.toISOString(),
    meta: ctx.meta ?? null,
    given: ctx.given ?? [],
    result: { tool: { name: "psdgate", version }, profile, failed, entries: sorted },
  });
}
