import { basename, dirname, extname, relative, resolve, sep } from "node:path";

/**
 * One report file name per recording of a batch, derived from its path and never shared:
 * - `run.html` for `…/run.wav` when no other recording of the batch has the stem `run`;
 * - otherwise the path below the folder the clashing recordings share, with `/` as `__`:
 *   `a/run.wav` and `b/run.wav` give `a__run.html` and `b__run.html`;
 * - a name still taken (the same recording twice, or `a__run.wav` beside `a/run.wav`) gets `~2`, `~3`, …
 * Names are compared without regard to case, for case-insensitive file systems.
 */
export function reportFileNames(files: string[], extension = ".html"): string[] {
  const stem = (f: string) => basename(f, extname(f)) || "recording";
  const byStem = new Map<string, number[]>();
  files.forEach((f, i) => {
    const k = stem(f).toLowerCase();
    byStem.set(k, [...(byStem.get(k) ?? []), i]);
  });
  const wanted = files.map(stem);
  for (const group of byStem.values()) {
    if (group.length < 2) continue;
    const abs = group.map((i) => resolve(files[i]!));
    const common = abs.reduce((a, b) => commonFolder(a, dirname(b)), dirname(abs[0]!));
    for (let k = 0; k < group.length; k++) {
      const rel = relative(common, abs[k]!);
      const parts = rel.split(sep).filter((p) => p !== "" && p !== "..");
      parts[parts.length - 1] = stem(files[group[k]!]!);
      wanted[group[k]!] = parts.join("__");
    }
  }
  const taken = new Set<string>();
  return wanted.map((w) => {
    let name = `${w}${extension}`;
    for (let n = 2; taken.has(name.toLowerCase()); n++) name = `${w}~${n}${extension}`;
    taken.add(name.toLowerCase());
    return name;
  });
}

function commonFolder(a: string, b: string): string {
  const pa = a.split(sep);
  const pb = b.split(sep);
  let n = 0;
  while (n < pa.length && n < pb.length && pa[n] === pb[n]) n++;
  return pa.slice(0, n).join(sep) || sep;
}
