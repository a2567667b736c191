import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { spawnSync } from "node:child_process";
import { runCli } from "../src/cli/main.js";
import { embedResult, RESULT_PLACEHOLDER } from "../src/report/embeddedResult.js";

export interface Reference {
  source: string;
  sampleRateHz: number;
  signal: number[];
  welch: {
    window: string;
    segmentLength: number;
    overlap: number;
    detrend: string;
    frequencyHz: number[];
    psd: number[];
  }[];
  windows: Record<string, { coherentGain: number; enbwBins: number }>;
  chi2: { dof: number; p: number; quantile: number }[];
  moments: Record<string, number>;
}

export const scipyReference: Reference = JSON.parse(
  readFileSync(new URL("./fixtures/scipy-reference.json", import.meta.url), "utf8"),
);

export function tempDir(): string {
  return mkdtempSync(join(tmpdir(), "psdgate-test-"));
}

/** Seeded generator (mulberry32) and Gaussian samples by Box-Muller, for tests only. */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function gaussian(n: number, seed: number, sigma = 1): Float64Array {
  const u = seeded(seed);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i += 2) {
    const r = Math.sqrt(-2 * Math.log(1 - u())) * sigma;
    const th = 2 * Math.PI * u();
    x[i] = r * Math.cos(th);
    if (i + 1 < n) x[i + 1] = r * Math.sin(th);
  }
  return x;
}

export function maxRelDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  let scale = 0;
  for (let i = 0; i < b.length; i++) scale = Math.max(scale, Math.abs(b[i]!));
  for (let i = 0; i < b.length; i++) m = Math.max(m, Math.abs(a[i]! - b[i]!) / scale);
  return m;
}

export async function cli(...argv: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = "";
  let stderr = "";
  const code = await runCli(argv, { stdout: (s) => (stdout += s), stderr: (s) => (stderr += s) });
  return { code, stdout, stderr };
}

export function python(code: string): string {
  const r = spawnSync("python3", ["-c", code], { encoding: "utf8", maxBuffer: 1 << 28 });
  if (r.status !== 0) throw new Error(r.stderr);
  return r.stdout;
}

/**
 * Re-sign a report as a forger who knows how psdgate makes its digests would: edit the page and the
 * embedded result, then recompute the page digest and the result digest (embedResult does both).
 */
export function forge(
  html: string,
  editPage: (page: string) => string,
  editResult: (doc: Record<string, unknown>) => void,
): string {
  const m = /<template id="psdgate-result" data-sha256="[0-9a-f]{64}">([\s\S]*?)<\/template>/.exec(html)!;
  const doc = JSON.parse(m[1]!.replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&amp;/g, "&")) as Record<
    string,
    unknown
  >;
  delete doc.format;
  delete doc.page;
  editResult(doc);
  const page = editPage(html.slice(0, m.index) + RESULT_PLACEHOLDER + html.slice(m.index + m[0].length));
  return embedResult(page, doc);
}
