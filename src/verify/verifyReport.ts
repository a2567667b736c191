import { basename, dirname, join } from "node:path";
import { EARLIER_WORDINGS } from "./earlierWordings.js";
import { changesSince } from "./methodChanges.js";
import { analyzeRecording, type AnalysisOptions } from "../pass/analyzeRecording.js";
import { checkRecording, loadProfile, type CheckOptions } from "../analyses/checkRecording.js";
import { InputError } from "../errors.js";
import { pathExists, readSmallText, sha256OfFile } from "../read/regularFile.js";
import type { TestMeta } from "../read/testMeta.js";
import { checkJson } from "../report/checkReport.js";
import { BATCH_STYLE } from "../report/batchIndex.js";
import { DERIVE_STYLE } from "../report/deriveHtml.js";
import { EXTRA_STYLE as RESPOND_STYLE } from "../report/responseHtml.js";
import { RIDE_STYLE } from "../report/rideHtml.js";
import { EXTRA_STYLE as TRANSFER_STYLE } from "../report/transferHtml.js";
import { type ExtractedResult, extractResult } from "../report/embeddedResult.js";
import { foreignContent, scanPage, shownVerdict } from "./pageScan.js";
import { asRecorded, comparePages, recordedContext } from "./renderedPage.js";
import { isFrameStyle, PEAK_HOLD_STYLE } from "../report/reportPage.js";
import { psdJson } from "../report/psdJson.js";
import type { DeriveOptions } from "../analyses/deriveProfile.js";
import type { RecordKind } from "../report/reportPage.js";

/**
 * `psdgate verify REPORT.html`: is a report what psdgate wrote, and does re-running its recorded
 * analysis on its inputs give the same numbers and verdict?
 *
 * 1. The embedded result's digest and the page digest inside it (report/embeddedResult.ts): an edit
 *    to the page or to the result is found.
 * 2. The recording and the profile it names, found where the options say, else beside the report, else
 *    at the recorded path: SHA-256 against the recorded ones.
 * 3. The recorded analysis re-run on them, and every number of the result compared within a relative
 *    tolerance (strings and the verdict exactly).
 */
export interface VerifyOptions {
  recording?: string | undefined;
  profile?: string | undefined;
  /** Relative tolerance on every number (default 1e-9: the same code on the same bytes gives the same bits). */
  tolerance?: number | undefined;
  /** The running psdgate's version (a report from another version is compared all the same, and says so). */
  version: string;
}

export type VerifyStatus = "reproduced" | "differs" | "missing";

export interface VerifyStep {
  step: "result" | "page" | "recording" | "profile" | "rerun" | "rendered";
  ok: boolean;
  text: string;
}

export interface VerifyResult {
  status: VerifyStatus;
  report: string;
  kind?: RecordKind | undefined;
  steps: VerifyStep[];
  /** Up to 20 differences, each with its JSON path. */
  differences: string[];
  /** Inputs that could not be found, with where they were looked for. */
  missing: string[];
  /** Numbers compared in the re-run. */
  compared: number;
}

const IGNORED = new Set(["input.file", "analysis.file", "profile.file", "tool.version"]);
/** Input paths inside a derive result: where the files were found may differ from where they were read. */
const IGNORED_PATTERN = /^(recordings\[\d+\]\.file|profile\.provenance\.inputs\[\d+\]\.file)$/;

/**
 * The fields a later psdgate added to a result, array indices folded to `[]`. They carry no verdict and no
 * evidence of one (the resolved analysis, a finding's values beside its text, a profile's provenance, the Parseval
 * check's second reference beside its first), so a
 * report made before them still verifies on every number it holds. Nothing else may be missing.
 */
const ADDED_LATER = [
  /^analysis$/,
  /(^|\.)\w*[fF]indings\[\]\.values$/,
  /^profile\.(provenance|origin)$/,
  // The Parseval check's second reference (0.3.0): figures beside the first, whose ratio, tolerance and findings
  // are still compared.
  /^channels\[\]\.parseval\.slowPart$/,
  /^channels\[\]\.(rmsReference|parsevalSlowRatio|parsevalSlowTolerance)$/,
];

/**
 * What compareResults found: the differences, the numbers compared, fields only a later psdgate writes, fields in an
 * earlier wording (EARLIER_WORDINGS).
 */
export interface ComparedResults {
  diffs: string[];
  compared: number;
  added: string[];
  reworded: string[];
}

export interface CompareOptions {
  /**
   * The report was made by another psdgate version: a field in ADDED_LATER that only the re-run has is listed, not a
   * difference.
   */
  olderReport?: boolean | undefined;
}

/**
 * Every difference between a recorded and a re-computed result, by JSON path. A field the re-run has and the
 * record lacks is a difference: a verdict, a rule or a channel deleted from a record is not "not compared".
 * The one exception is a field a later psdgate added (ADDED_LATER) when the report came from another
 * version: it is listed in `added`. A recorded field the re-run lacks is a difference.
 */
export function compareResults(
  recorded: unknown,
  now: unknown,
  tolerance: number,
  path = "",
  out: ComparedResults = { diffs: [], compared: 0, added: [], reworded: [] },
  opts: CompareOptions = { olderReport: true },
) {
  if (IGNORED.has(path) || IGNORED_PATTERN.test(path)) return out;
  if (recorded === undefined && now !== undefined) {
    const folded = path.replace(/\[\d+\]/g, "[]");
    if (opts.olderReport && ADDED_LATER.some((re) => re.test(folded))) out.added.push(path);
    else out.diffs.push(`${path}: not in the report, re-run ${JSON.stringify(now)?.slice(0, 60)}`);
    return out;
  }
  const add = (s: string) => out.diffs.push(s);
  // JSON writes a non-finite number as null (ECMA-262, JSON.stringify): the re-run's -Infinity (a stretch with no
  // signal) or NaN is the null the record holds.
  if (recorded === null && typeof now === "number" && !Number.isFinite(now)) {
    out.compared++;
    return out;
  }
  if (typeof recorded === "number" && typeof now === "number") {
    out.compared++;
    const scale = Math.max(Math.abs(recorded), Math.abs(now));
    if (!(Math.abs(recorded - now) <= tolerance * scale)) add(`${path}: recorded ${recorded}, re-run ${now}`);
  } else if (Array.isArray(recorded) && Array.isArray(now)) {
    if (recorded.length !== now.length) add(`${path}: recorded ${recorded.length} values, re-run ${now.length}`);
    else
      for (let i = 0; i < recorded.length; i++)
        compareResults(recorded[i], now[i], tolerance, `${path}[${i}]`, out, opts);
  } else if (recorded !== null && now !== null && typeof recorded === "object" && typeof now === "object") {
    const keys = new Set([...Object.keys(recorded), ...Object.keys(now)]);
    for (const k of keys)
      compareResults(
        (recorded as Record<string, unknown>)[k],
        (now as Record<string, unknown>)[k],
        tolerance,
        path ? `${path}.${k}` : k,
        out,
        opts,
      );
  } else if (recorded !== now) {
    if (typeof recorded === "string" && typeof now === "string" && EARLIER_WORDINGS[path]?.includes(recorded)) {
      out.reworded.push(path);
      return out;
    }
    add(`${path}: recorded ${JSON.stringify(recorded)?.slice(0, 60)}, re-run ${JSON.stringify(now)?.slice(0, 60)}`);
  }
  return out;
}

/**
 * The fields a later psdgate adds, named once each (array indices folded), and those in an earlier wording, for the
 * re-run's line.
 */
function addedNote(cmp: ComparedResults): string {
  const reworded = cmp.reworded.length
    ? `; in an earlier wording of the same rule, so not compared as text: ${cmp.reworded.join(", ")}`
    : "";
  if (cmp.added.length === 0) return reworded;
  const names = [...new Set(cmp.added.map((p) => p.replace(/\[\d+\]/g, "[]")))];
  return `; not in the report, so not compared (added by a later psdgate than the report's): ${names.slice(0, 6).join(", ")}${names.length > 6 ? ` and ${names.length - 6} more` : ""}${reworded}`;
}

/** The fields each kind of record must hold: its verdict (where it has one) and the evidence for it. */
export const REQUIRED_FIELDS: Record<string, readonly string[]> = {
  check: ["tool", "verdict", "input", "profile", "settings", "rule", "control", "channels"],
  psd: ["tool", "input", "settings", "channels"],
  derive: ["tool", "recordings", "groups", "fnHz", "fieldFatigue", "testFatigue", "fieldExtreme", "testExtreme", "fit"],
  ride: ["tool", "input", "axes"],
  transfer: ["tool", "input", "outputs"],
  respond: ["tool", "source", "fnHz", "accelRms"],
  shock: ["tool", "input", "channels"],
  batch: ["tool", "profile", "entries", "failed"],
};
const VERDICTS = ["pass", "fail", "inconclusive"];

/** The first required field a record lacks (or holds in a form psdgate never writes), or undefined. */
function requiredMissing(kind: string | undefined, result: Record<string, unknown>): string | undefined {
  const need = kind !== undefined ? REQUIRED_FIELDS[kind] : undefined;
  if (!need) return undefined;
  for (const k of need) if (!(k in result) || result[k] === undefined) return `"${k}"`;
  if (kind === "check" && !VERDICTS.includes(result.verdict as string))
    return "verdict psdgate gives (pass, fail or inconclusive)";
  if ((kind === "check" || kind === "psd") && (!Array.isArray(result.channels) || result.channels.length === 0))
    return "channels";
  return undefined;
}

/** Style elements a page of each kind carries besides the frame's (report/reportPage.ts). */
const EXTRA_STYLES: Record<string, readonly string[]> = {
  psd: [PEAK_HOLD_STYLE],
  derive: [DERIVE_STYLE],
  ride: [RIDE_STYLE, PEAK_HOLD_STYLE],
  transfer: [TRANSFER_STYLE],
  respond: [RESPOND_STYLE],
  batch: [BATCH_STYLE],
};
const BANNER_WORD: Record<string, string> = {
  psd: "PSD",
  derive: "PROFILE",
  ride: "RIDE",
  transfer: "FRF",
  respond: "SDOF",
  batch: "BATCH",
  shock: "SHOCK",
};

/**
 * What is wrong with the page as psdgate would write it, or undefined: the page is parsed (verify/pageScan.ts),
 * and it must hold no script, handler, fetch or style attribute, only the style elements psdgate writes, and
 * exactly one verdict banner whose attribute, class and word all say the recorded verdict.
 */
function pageCheck(html: string, kind: string | undefined, verdict: string | undefined): string | undefined {
  const page = scanPage(html);
  const foreign = foreignContent(page, { links: kind === "batch" });
  if (foreign) return `the page holds ${foreign}, which psdgate never writes`;
  const extras = [...(EXTRA_STYLES[kind ?? ""] ?? [])];
  let frame = 0;
  for (const st of page.styles) {
    if (isFrameStyle(st)) frame++;
    else {
      const i = extras.indexOf(st);
      if (i < 0) return "the page holds a style element psdgate did not write";
      extras.splice(i, 1);
    }
  }
  if (frame !== 1) return `the page holds ${frame} frame style elements, psdgate writes one`;
  const v = shownVerdict(html, page);
  if (v.count !== 1) return `the page shows ${v.count} verdict banners, psdgate writes one`;
  const want = kind === "check" || kind === "batch" ? verdict : "none";
  const word = kind === "check" ? String(verdict).toUpperCase() : BANNER_WORD[kind ?? ""];
  if (v.dataVerdict !== want || v.classVerdict !== want || (word !== undefined && v.word !== word)) {
    return `the page shows verdict "${v.dataVerdict}" (class "${v.classVerdict}", word "${v.word}"), the result says "${want}"`;
  }
  return undefined;
}

/** Largest report `verify` reads: a record bounded as report writers bound it is a few MB; 256 MiB is far beyond. */
export const MAX_REPORT_BYTES = 256 << 20;

/** SHA-256 of an input by streaming, a regular file only (a FIFO or device is FILE_UNREADABLE at once). */
/** How a verification ends: its status, the steps so far and nothing compared unless `extra` says so. */
function ending(report: string, steps: VerifyStep[], missing: string[], kind?: RecordKind) {
  return (status: VerifyStatus, extra: Partial<VerifyResult> = {}): VerifyResult => ({
    status,
    report,
    ...(kind === undefined ? {} : { kind }),
    steps,
    differences: [],
    missing,
    compared: 0,
    ...extra,
  });
}

async function sha256File(file: string, what: string, option: string | undefined): Promise<string> {
  return (await sha256OfFile(file, what, option)).sha256;
}

/** Where an input is: the option, else beside the report, else the path recorded. */
function locate(given: string | undefined, recorded: string, report: string): { path?: string; looked: string[] } {
  if (given !== undefined) return pathExists(given) ? { path: given, looked: [given] } : { looked: [given] };
  const beside = join(dirname(report), basename(recorded));
  for (const p of [beside, recorded]) if (pathExists(p)) return { path: p, looked: [beside, recorded] };
  return { looked: [...new Set([beside, recorded])] };
}

/** The document embedded in a record, as verify reads it. */
interface RecordEnvelope {
  kind?: RecordKind;
  created?: string;
  given?: string[];
  rerun?: Record<string, unknown> | null;
  meta?: TestMeta | null;
  result?: Record<string, unknown>;
}

/** The fields of a result verify reads before it knows the kind (a check's, psd's or shock's inputs and verdict). */
interface AnalysisResult {
  verdict?: string;
  input?: { file: string; sha256: string };
  profile?: { file: string; sha256: string };
  tool?: { version?: string };
}

/** An input looked for and hashed: where it was found (none when missing); false only for another SHA-256. */
interface FoundInput {
  path?: string;
  ok: boolean;
}

/**
 * A record's analysis re-run: its result as the command prints it, and the page the command renders of it (given
 * the record's context and, for each input found elsewhere, the path the record names).
 */
interface Rerun {
  json: unknown;
  page: (context: ReturnType<typeof recordedContext>, paths: ReadonlyMap<string, string>) => Promise<string>;
}

/**
 * The step that holds a record's page to the page its re-run renders. A record made by another version of psdgate
 * was rendered by other code: its page is not compared, and the step says so (its numbers still are).
 */
async function renderedStep(
  html: string,
  doc: RecordEnvelope,
  rerun: Rerun,
  paths: ReadonlyMap<string, string>,
  version: string,
  running: string,
): Promise<VerifyStep> {
  if (version !== running)
    return {
      step: "rendered",
      ok: true,
      text: `the page's words and figures are not compared: it was rendered by psdgate ${version}, this is ${running}`,
    };
  const { ok, text } = comparePages(html, await rerun.page(recordedContext(doc), paths));
  return { step: "rendered", ok, text };
}

/** A check, psd or shock record that names its input and how it was analysed. */
type AnalysisDoc = RecordEnvelope & { kind: "check" | "psd" | "shock"; rerun: Record<string, unknown> };

/** Verify one report: its digests and page, then by its kind its inputs by SHA-256 and its analysis re-run. */
export async function verifyReport(report: string, options: VerifyOptions): Promise<VerifyResult> {
  const html = (
    await readSmallText(report, {
      what: "a readable psdgate HTML report",
      maxBytes: MAX_REPORT_BYTES,
      tooLarge: "INPUT_TOO_LARGE",
    })
  ).text;
  const tol = options.tolerance ?? 1e-9;
  const steps: VerifyStep[] = [];
  const done = ending(report, steps, []);
  const x = extractResult(html);
  if (!x.found) {
    // Not a record at all (any file, or a page whose result block was removed): a usage error, one line, exit 2.
    throw new InputError("NOT_A_REPORT", {
      file: report,
      expected: "an HTML record written by psdgate, with its embedded result",
      received: /<html/i.test(html.slice(0, 4096))
        ? "an HTML page with no psdgate result in it"
        : "a file that is not a psdgate record",
    });
  }
  if (x.doc === undefined) {
    steps.push({ step: "result", ok: false, text: "the embedded result is not valid JSON (edited)" });
    return done("differs");
  }
  const doc = x.doc as RecordEnvelope;
  const result = (doc.result ?? {}) as AnalysisResult;
  steps.push(...integritySteps(html, x, doc, result));
  const missingField = requiredMissing(doc.kind, result as Record<string, unknown>);
  if (missingField !== undefined) {
    steps.push({
      step: "result",
      ok: false,
      text: `the embedded result has no ${missingField}: a record without its verdict or evidence is not one psdgate writes`,
    });
    return done("differs", { kind: doc.kind });
  }
  if (doc.kind === "derive" && doc.rerun)
    return verifyDerivation(report, html, doc as DerivationDoc, steps, tol, options.version);
  if (doc.kind === "batch") return verifyBatch(report, html, doc, steps, options);
  if ((doc.kind === "ride" || doc.kind === "transfer" || doc.kind === "respond") && doc.rerun)
    return verifyRecord(report, html, doc as RecordDoc, steps, tol, options);
  if ((doc.kind !== "check" && doc.kind !== "psd" && doc.kind !== "shock") || !result.input || !doc.rerun) {
    steps.push({
      step: "result",
      ok: false,
      text: "the embedded result does not say what was analysed (kind, input, options)",
    });
    return done("differs", { kind: undefined });
  }
  return verifyAnalysis(report, html, doc as AnalysisDoc, result, steps, tol, options);
}

/**
 * The result's and the page's steps: both digests, and the page as psdgate writes it (its verdict banner the result's).
 */
function integritySteps(html: string, x: ExtractedResult, doc: RecordEnvelope, result: AnalysisResult): VerifyStep[] {
  const pageProblem = pageCheck(
    html,
    doc.kind,
    doc.kind === "batch" ? batchVerdict(result as BatchDoc) : result.verdict,
  );
  return [
    {
      step: "result",
      ok: x.resultIntact,
      text: x.resultIntact
        ? "embedded result intact (its SHA-256 matches)"
        : "embedded result edited (its SHA-256 does not match)",
    },
    {
      step: "page",
      ok: x.pageIntact && pageProblem === undefined,
      text:
        pageProblem !== undefined
          ? `${pageProblem} (edited)`
          : x.pageIntact
            ? "page intact (its SHA-256 matches the one in the result)"
            : "page edited outside the result (its SHA-256 does not match the one recorded)",
    },
  ];
}

/**
 * A check, psd or shock record: its recording (and a check's profile) by SHA-256, then its analysis re-run and every
 * number compared.
 */
async function verifyAnalysis(
  report: string,
  html: string,
  doc: AnalysisDoc,
  result: AnalysisResult,
  steps: VerifyStep[],
  tol: number,
  options: VerifyOptions,
): Promise<VerifyResult> {
  const missing: string[] = [];
  const done = ending(report, steps, missing);
  const found = await analysisInputs(report, doc, result, options, steps, missing);
  if (!found) return done("differs", { kind: doc.kind });
  const { rec, prof, inputsOk } = found;
  const intact = steps.every((s) => s.ok);
  if (missing.length > 0) return done(intact ? "missing" : "differs", { kind: doc.kind });
  if (!inputsOk) {
    steps.push({ step: "rerun", ok: false, text: "not re-run: an input is not the one the report was made from" });
    return done("differs", { kind: doc.kind });
  }
  const version = result.tool?.version ?? "?";
  const rerun = await rerunAnalysis(doc, rec.path!, prof.path, version);
  const now = rerun.json;
  const cmp = compareResults(doc.result, now, tol, "", undefined, { olderReport: version !== options.version });
  const again = (now as { verdict?: string }).verdict;
  const sameVersion = version === options.version;
  steps.push({
    step: "rerun",
    ok: cmp.diffs.length === 0,
    text:
      cmp.diffs.length === 0
        ? `${cmp.compared} numbers${doc.kind === "check" ? ` and the verdict ${String(again).toUpperCase()}` : ""} reproduced within a relative ${tol}${sameVersion ? "" : ` (report made by psdgate ${version}, re-run by ${options.version})`}${addedNote(cmp)}`
        : `${cmp.diffs.length} value(s) differ beyond a relative ${tol}${doc.kind === "check" && again !== result.verdict ? `; the verdict re-runs as ${String(again).toUpperCase()}, the report says ${String(result.verdict).toUpperCase()}` : ""}${changesSince(version, options.version, doc.kind)}`,
  });
  const paths = new Map([[rec.path!, result.input!.file]]);
  if (prof.path !== undefined && result.profile) paths.set(prof.path, result.profile.file);
  steps.push(await renderedStep(html, doc, rerun, paths, version, options.version));
  const status: VerifyStatus = steps.every((s) => s.ok) ? "reproduced" : "differs";
  return {
    status,
    report,
    kind: doc.kind,
    steps,
    differences: cmp.diffs.slice(0, 20),
    missing,
    compared: cmp.compared,
  };
}

/**
 * A check, psd or shock record's inputs located and hashed (the recording, and a check's profile), each step or
 * miss recorded; undefined for a check record that names no profile.
 */
async function analysisInputs(
  report: string,
  doc: AnalysisDoc,
  result: AnalysisResult,
  options: VerifyOptions,
  steps: VerifyStep[],
  missing: string[],
): Promise<{ rec: FoundInput; prof: FoundInput; inputsOk: boolean } | undefined> {
  const input = result.input!;
  const rec = await hashedInput(
    report,
    {
      given: options.recording,
      option: "recording",
      file: input.file,
      sha256: input.sha256,
      step: "recording",
      name: "recording",
      hint: "; give it as `recording`",
      what: "a readable recording",
    },
    steps,
    missing,
  );
  let inputsOk = rec.ok;
  let prof: FoundInput = { ok: true };
  if (doc.kind === "check") {
    if (!result.profile) return undefined;
    prof = await hashedInput(
      report,
      {
        given: options.profile,
        option: "profile",
        file: result.profile.file,
        sha256: result.profile.sha256,
        step: "profile",
        name: "profile",
        hint: "; give it as `profile`",
        what: "a readable profile file",
      },
      steps,
      missing,
    );
    inputsOk &&= prof.ok;
  }
  return { rec, prof, inputsOk };
}

/**
 * The result a check, psd or shock record's rerun options give on the inputs found: the same function the command
 * printed it with.
 */
async function rerunAnalysis(
  doc: AnalysisDoc,
  recording: string,
  profile: string | undefined,
  version: string,
): Promise<Rerun> {
  const meta = doc.meta ?? undefined;
  if (doc.kind === "check") {
    const r = await checkRecording(recording, await loadProfile(profile!), doc.rerun as CheckOptions);
    return {
      json: checkJson(r, version, meta),
      page: async (c, paths) => {
        const { checkHtml } = await import("../report/htmlReport.js");
        return checkHtml(asRecorded(r, paths), version, c.when, c);
      },
    };
  }
  if (doc.kind === "shock") {
    // A shock record: the events and spectra re-run from the recorded options (two reads of the recording).
    const { shockRecording } = await import("../analyses/shockRecording.js");
    const { shockJson } = await import("../report/shockReport.js");
    const r = await shockRecording(recording, doc.rerun as never);
    return {
      json: shockJson(r, version),
      page: async (c, paths) => {
        const { shockHtml } = await import("../report/shockHtml.js");
        return shockHtml(asRecorded(r, paths), version, c.when, c);
      },
    };
  }
  const a = await analyzeRecording(recording, doc.rerun as AnalysisOptions);
  return {
    json: psdJson(a, version, meta),
    page: async (c, paths) => {
      const { psdHtml } = await import("../report/psdHtml.js");
      return psdHtml(asRecorded(a, paths), version, c.when, c);
    },
  };
}

/**
 * Re-run options as a record made before the options family (issue #23) wrote them, in today's keys: one
 * channel as `channel` becomes `channels: [it]`, derive's band `fromHz`/`toHz` becomes `fminHz`/`fmaxHz`.
 */
function channelSpelled(o: Record<string, unknown> | undefined): Record<string, unknown> | undefined {
  if (o === undefined || !("channel" in o)) return o;
  const { channel, ...rest } = o;
  return { ...rest, channels: rest.channels ?? (channel === undefined || channel === null ? undefined : [channel]) };
}

function respondRerunSpelled(rerun: Record<string, unknown>): Record<string, unknown> {
  const against = rerun.against as { options?: Record<string, unknown> } | undefined;
  return {
    ...rerun,
    source: channelSpelled(rerun.source as Record<string, unknown> | undefined),
    ...(against ? { against: { ...against, options: channelSpelled(against.options) } } : {}),
  };
}

function deriveRerunSpelled(rerun: DerivationDoc["rerun"]): DerivationDoc["rerun"] {
  const { fromHz, toHz, ...rest } = channelSpelled(rerun as unknown as Record<string, unknown>)! as Record<
    string,
    unknown
  >;
  return { ...rest, fminHz: rest.fminHz ?? fromHz, fmaxHz: rest.fmaxHz ?? toHz } as unknown as DerivationDoc["rerun"];
}

interface DerivationDoc {
  kind: "derive";
  created: string;
  rerun: Omit<DeriveOptions, "version" | "created">;
  /** The profile file the derivation wrote, by SHA-256 (records from before it was kept lack it). */
  written?: { file: string; sha256: string };
  result: {
    tool?: { version?: string };
    recordings?: { file: string; sha256: string }[];
    profile?: { provenance?: { inputs?: { file: string; sha256: string; role?: string }[] } };
  };
}

/**
 * One recorded input of a record: looked for (given, beside the report, at its recorded path) and hashed by
 * streaming; its step, or its miss, recorded. `ok` is false only for a file found with another SHA-256.
 */
async function hashedInput(
  report: string,
  i: {
    given?: string | undefined;
    file: string;
    sha256: string;
    step: VerifyStep["step"];
    name: string;
    label?: string;
    hint?: string;
    what?: string;
    /** The option that gave the file, named in an error reading it (only when `given` is set). */
    option?: string;
  },
  steps: VerifyStep[],
  missing: string[],
): Promise<{ path?: string; ok: boolean }> {
  const at = locate(i.given, i.file, report);
  if (!at.path) {
    missing.push(`${i.name} ${basename(i.file)} (looked for ${at.looked.join(", ")}${i.hint ?? ""})`);
    return { ok: true };
  }
  const ok =
    (await sha256File(at.path, i.what ?? "a readable file", i.given !== undefined ? i.option : undefined)) === i.sha256;
  steps.push({
    step: i.step,
    ok,
    text: `${at.path}${i.label ? ` (${i.label})` : ""}: ${ok ? "SHA-256 matches" : `SHA-256 differs from the recorded ${i.sha256.slice(0, 12)}… (another or a changed file)`}`,
  });
  return { path: at.path, ok };
}

/**
 * A derive record: every field recording (and the mix file) by SHA-256, then the derivation re-run with its recorded
 * settings.
 */
async function verifyDerivation(
  report: string,
  html: string,
  doc: DerivationDoc,
  steps: VerifyStep[],
  tol: number,
  running: string,
): Promise<VerifyResult> {
  const missing: string[] = [];
  const recorded = doc.result.recordings ?? [];
  const given = doc.rerun.recordings ?? [];
  const done = ending(report, steps, missing, "derive");
  if (recorded.length !== given.length || recorded.length === 0) {
    steps.push({ step: "result", ok: false, text: "the embedded result does not list its field recordings" });
    return done("differs");
  }
  let inputsOk = true;
  const found: string[] = [];
  for (const [i, r] of recorded.entries()) {
    const at = await hashedInput(
      report,
      { file: r.file, sha256: r.sha256, step: "recording", name: "recording", what: "a readable recording" },
      steps,
      missing,
    );
    inputsOk &&= at.ok;
    if (at.path) found[i] = at.path;
  }
  // The mix file (its hours are in the recorded settings) and the profile written, by SHA-256.
  const mix = doc.result.profile?.provenance?.inputs?.find((i) => i.role === "mix");
  for (const [label, f] of [
    ["mix file", mix],
    ["profile written", doc.written],
  ] as const) {
    if (f)
      inputsOk &&= (
        await hashedInput(
          report,
          { file: f.file, sha256: f.sha256, step: "profile", name: label, label },
          steps,
          missing,
        )
      ).ok;
  }
  const intact = steps.every((s) => s.ok);
  if (missing.length > 0) return done(intact ? "missing" : "differs");
  if (!inputsOk) {
    steps.push({ step: "rerun", ok: false, text: "not re-run: an input is not the one the report was made from" });
    return done("differs");
  }
  const version = doc.result.tool?.version ?? "?";
  const { deriveProfile, strokeOf } = await import("../analyses/deriveProfile.js");
  const { deriveJson, profileDocumentText } = await import("../report/deriveReport.js");
  const { parseProfile } = await import("../compare/testProfile.js");
  const r = await deriveProfile({
    ...deriveRerunSpelled(doc.rerun),
    recordings: given.map((g, i) => ({ ...g, file: found[i]! })),
    version,
    created: new Date(doc.created),
  });
  // As `derive` does: the profile read back from the text it writes, and the stroke checked on that.
  const outFile = doc.rerun.outFile ?? doc.written?.file ?? "derived.json";
  const text = profileDocumentText(r.document, outFile);
  r.profile = parseProfile(text, outFile);
  Object.assign(r, strokeOf(r.profile, doc.rerun.strokeMm));
  if (doc.written) {
    const same = r.profile.sha256 === doc.written.sha256;
    steps.push({
      step: "profile",
      ok: same,
      text: same
        ? "the re-run writes the same profile, byte for byte (SHA-256)"
        : `the re-run writes a different profile (SHA-256 ${r.profile.sha256.slice(0, 12)}…, recorded ${doc.written.sha256.slice(0, 12)}…)`,
    });
  }
  const cmp = compareResults(doc.result, deriveJson(r, version), tol, "", undefined, {
    olderReport: version !== running,
  });
  steps.push({
    step: "rerun",
    ok: cmp.diffs.length === 0,
    text:
      cmp.diffs.length === 0
        ? `${cmp.compared} numbers of the derivation reproduced within a relative ${tol}${version === running ? "" : ` (report made by psdgate ${version}, re-run by ${running})`}${addedNote(cmp)}`
        : `${cmp.diffs.length} value(s) differ beyond a relative ${tol}${changesSince(version, running, "derive")}`,
  });
  const recordedPaths = new Map(found.map((p, n) => [p, recorded[n]!.file]));
  const rerun: Rerun = {
    json: undefined,
    page: async (c, paths) => {
      const { deriveHtml } = await import("../report/deriveHtml.js");
      return deriveHtml(asRecorded(r, paths), version, c.when, { ...c, outFile });
    },
  };
  steps.push(await renderedStep(html, doc as RecordEnvelope, rerun, recordedPaths, version, running));
  return done(steps.every((s) => s.ok) ? "reproduced" : "differs", {
    differences: cmp.diffs.slice(0, 20),
    compared: cmp.compared,
  });
}

interface RecordDoc {
  kind: "ride" | "transfer" | "respond";
  created: string;
  meta?: TestMeta | null;
  rerun: Record<string, unknown>;
  result: Record<string, unknown> & { tool?: { version?: string } };
}

/** One input of a record: what it is, where the record says it was, its SHA-256, and the path an option gives. */
interface RecordInput {
  role: "recording" | "profile";
  label: string;
  file: string;
  sha256: string;
  given?: string | undefined;
}

/** The inputs a ride, transfer or respond record names (respond: its source and any --against input). */
function recordInputs(doc: RecordDoc, options: VerifyOptions): RecordInput[] | undefined {
  const r = doc.result as {
    input?: { file: string; sha256: string };
    source?: { file: string; sha256: string; kind?: string };
    against?: { source?: { file: string; sha256: string; kind?: string } } | null;
  };
  if (doc.kind === "respond") {
    if (!r.source?.file || !r.source.sha256) return undefined;
    const role = (k?: string) => (k === "recording" ? "recording" : "profile") as RecordInput["role"];
    const list: RecordInput[] = [
      {
        role: role(r.source.kind),
        label: "source",
        file: r.source.file,
        sha256: r.source.sha256,
        given: r.source.kind === "recording" ? options.recording : options.profile,
      },
    ];
    const b = r.against?.source;
    if (b?.file && b.sha256) list.push({ role: role(b.kind), label: "against", file: b.file, sha256: b.sha256 });
    return list;
  }
  if (!r.input?.file || !r.input.sha256) return undefined;
  return [
    { role: "recording", label: "recording", file: r.input.file, sha256: r.input.sha256, given: options.recording },
  ];
}

/** The result a record's rerun options give on the inputs found: the same function the command printed it with. */
async function rerunRecord(doc: RecordDoc, paths: string[], version: string): Promise<Rerun> {
  if (doc.kind === "ride") {
    const { rideRecording } = await import("../analyses/rideRecording.js");
    const { rideJson } = await import("../report/rideReport.js");
    // The page's spectrogram is made only for a report (as `ride --report` asks for it); no number of the result
    // depends on it.
    const r = await rideRecording(paths[0]!, { ...(doc.rerun as object), spectrogram: true } as never);
    return {
      json: rideJson(r, version),
      page: async (c, found) => {
        const { rideHtml } = await import("../report/rideHtml.js");
        return rideHtml(asRecorded(r, found), version, c.when, c);
      },
    };
  }
  if (doc.kind === "transfer") {
    const { analyzeTransfer } = await import("../analyses/analyzeTransfer.js");
    const { transferJson } = await import("../report/transferReport.js");
    const t = await analyzeTransfer(paths[0]!, doc.rerun as never);
    return {
      json: transferJson(t, version),
      page: async (c, found) => {
        const { transferHtml } = await import("../report/transferHtml.js");
        return transferHtml(asRecorded(t, found), version, c.when, c);
      },
    };
  }
  const { runResponse } = await import("../analyses/responseSpectra.js");
  const { responseJson } = await import("../report/responseReport.js");
  const { r, against } = await runResponse(paths[0]!, respondRerunSpelled(doc.rerun) as never, paths[1]);
  return {
    json: responseJson(r, version, against),
    page: async (c, found) => {
      const { responseHtml } = await import("../report/responseHtml.js");
      return responseHtml(asRecorded(r, found), version, c.when, c, against && asRecorded(against, found));
    },
  };
}

/** JSON paths that hold where an input was read, not what it held (respond names its source files). */
const RECORD_IGNORED = /^(source\.file|against\.source\.file)$/;

/**
 * A ride, transfer or respond record: its inputs by SHA-256, then its analysis re-run with the recorded options and
 * every number compared.
 */
async function verifyRecord(
  report: string,
  html: string,
  doc: RecordDoc,
  steps: VerifyStep[],
  tol: number,
  options: VerifyOptions,
): Promise<VerifyResult> {
  const missing: string[] = [];
  const done = ending(report, steps, missing, doc.kind);
  const inputs = recordInputs(doc, options);
  if (!inputs) {
    steps.push({
      step: "result",
      ok: false,
      text: "the embedded result does not say what was analysed (kind, input, options)",
    });
    return done("differs");
  }
  let inputsOk = true;
  const paths: string[] = [];
  for (const i of inputs) {
    const hint = i.given === undefined && i.label !== "against" ? `; give it as \`${i.role}\`` : "";
    const at = await hashedInput(
      report,
      {
        given: i.given,
        file: i.file,
        sha256: i.sha256,
        step: i.role,
        name: i.label,
        hint,
        what: i.role === "recording" ? "a readable recording" : "a readable profile file",
        option: `--${i.role}`,
      },
      steps,
      missing,
    );
    inputsOk &&= at.ok;
    if (at.path) paths.push(at.path);
  }
  const intact = steps.every((s) => s.ok);
  if (missing.length > 0) return done(intact ? "missing" : "differs");
  if (!inputsOk) {
    steps.push({ step: "rerun", ok: false, text: "not re-run: an input is not the one the report was made from" });
    return done("differs");
  }
  const version = doc.result.tool?.version ?? "?";
  const rerun = await rerunRecord(doc, paths, version);
  const now = rerun.json;
  const cmp = compareResults(strip(doc.result), strip(now as Record<string, unknown>), tol, "", undefined, {
    olderReport: version !== options.version,
  });
  steps.push({
    step: "rerun",
    ok: cmp.diffs.length === 0,
    text:
      cmp.diffs.length === 0
        ? `${cmp.compared} numbers of the ${doc.kind} result reproduced within a relative ${tol}${version === options.version ? "" : ` (report made by psdgate ${version}, re-run by ${options.version})`}${addedNote(cmp)}`
        : `${cmp.diffs.length} value(s) differ beyond a relative ${tol}${changesSince(version, options.version, doc.kind)}`,
  });
  const found = new Map(paths.map((p, k) => [p, inputs[k]!.file]));
  steps.push(await renderedStep(html, doc, rerun, found, version, options.version));
  return done(steps.every((s) => s.ok) ? "reproduced" : "differs", {
    differences: cmp.diffs.slice(0, 20),
    compared: cmp.compared,
  });
}

/** A result with the paths it was read from left out (compared by SHA-256 above instead). */
function strip(result: Record<string, unknown>): Record<string, unknown> {
  const copy = JSON.parse(JSON.stringify(result)) as Record<string, unknown>;
  const drop = (o: unknown, path: string) => {
    if (o === null || typeof o !== "object" || Array.isArray(o)) return;
    for (const k of Object.keys(o)) {
      const p = path ? `${path}.${k}` : k;
      if (RECORD_IGNORED.test(p)) delete (o as Record<string, unknown>)[k];
      else drop((o as Record<string, unknown>)[k], p);
    }
  };
  drop(copy, "");
  return copy;
}

interface BatchDoc {
  tool?: { version?: string };
  entries?: { file: string; report: string; reportSha256?: string; verdict?: string }[];
  failed?: number;
  profile?: { title: string; file: string; sha256: string };
}

/** The verdict a batch index's banner shows: its worst (report/batchIndex.ts). */
function batchVerdict(doc: BatchDoc): string {
  const v = (doc.entries ?? []).map((e) => e.verdict);
  return v.includes("fail") ? "fail" : v.includes("inconclusive") || (doc.failed ?? 0) > 0 ? "inconclusive" : "pass";
}

/**
 * A batch index: its page rendered again from its result, then every linked report beside it, by the SHA-256 the
 * index recorded and verified in full (its inputs, its re-run, its page), its verdict the one the index lists.
 */
async function verifyBatch(
  report: string,
  html: string,
  envelope: RecordEnvelope,
  steps: VerifyStep[],
  options: VerifyOptions,
): Promise<VerifyResult> {
  const doc = (envelope.result ?? {}) as BatchDoc;
  const missing: string[] = [];
  const version = doc.tool?.version ?? "?";
  const rerun: Rerun = {
    json: undefined,
    page: async (c) => {
      const { batchIndexHtml } = await import("../report/batchIndex.js");
      return batchIndexHtml(doc.entries as never, doc.failed ?? 0, doc.profile as never, version, c.when, {
        meta: c.meta,
        given: c.given,
      });
    },
  };
  steps.push(await renderedStep(html, envelope, rerun, new Map(), version, options.version));
  let ok = 0;
  for (const e of doc.entries ?? []) {
    const at = join(dirname(report), e.report);
    if (!pathExists(at)) {
      missing.push(`report ${e.report} of ${basename(e.file)} (looked for ${at})`);
      continue;
    }
    const same =
      e.reportSha256 !== undefined && (await sha256File(at, "a readable file", undefined)) === e.reportSha256;
    if (!same) {
      steps.push({
        step: "recording",
        ok: false,
        text: `${at}: ${e.reportSha256 === undefined ? "no SHA-256 recorded for it" : "SHA-256 differs from the one the index recorded (the report was replaced or edited)"}`,
      });
      continue;
    }
    const v = await verifyReport(at, { version: options.version, tolerance: options.tolerance });
    const page = await readSmallText(at, {
      what: "a readable psdgate HTML report",
      maxBytes: MAX_REPORT_BYTES,
      tooLarge: "INPUT_TOO_LARGE",
    });
    const shown = (extractResult(page.text).doc?.result as { verdict?: string } | undefined)?.verdict;
    const failed = v.steps.find((s) => !s.ok);
    if (v.status === "missing") missing.push(...v.missing.map((m) => `${m}, for ${e.report}`));
    else if (v.status !== "reproduced" || shown !== e.verdict)
      steps.push({
        step: "rerun",
        ok: false,
        text: `${e.report}: ${failed ? `${failed.step}: ${failed.text}` : `its verdict is ${String(shown).toUpperCase()}, the index lists ${String(e.verdict).toUpperCase()}`}`,
      });
    else ok++;
  }
  const n = (doc.entries ?? []).length;
  steps.push({
    step: "rerun",
    ok: steps.every((s) => s.ok),
    text: `${ok} of ${n} linked reports are the ones the index lists (SHA-256), and each verifies: its inputs, its re-run and its page, with the verdict the index shows`,
  });
  const intact = steps.every((s) => s.ok);
  return {
    status: !intact ? "differs" : missing.length ? "missing" : "reproduced",
    report,
    kind: "batch",
    steps,
    differences: [],
    missing,
    compared: 0,
  };
}
