import { scaleLinear, scaleLog, type ScaleContinuousNumeric } from "d3-scale";
import { area, line } from "d3-shape";
import { maxOf } from "./format.js";
import { printable } from "./printable.js";

/**
 * Small SVG plots built as strings (no DOM): d3-scale for the scales and log ticks, d3-shape for the
 * paths. Every series is a <path data-series="…"> so tests and readers can find it.
 */
export interface Series {
  id: string;
  /** Legend text; an empty label keeps the series out of the legend. */
  label: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Optional second y for a filled band between y and y2. */
  y2?: ArrayLike<number> | undefined;
  className: string;
  /** Draw a small marker at each point instead of a line (lines shown outside tolerance). */
  markers?: boolean | undefined;
}

export interface PlotSpec {
  id: string;
  title: string;
  xLabel: string;
  yLabel: string;
  xDomain: [number, number];
  yDomain: [number, number];
  yLog: boolean;
  /** Log x axis (default true); false gives a linear x axis (time plots). */
  xLog?: boolean | undefined;
  series: Series[];
  /**
   * Horizontal reference lines (an event threshold), drawn dashed across the plot where they fall inside the y domain.
   */
  rules?: number[] | undefined;
  /** Height in SVG units (default 340; the width is always 720, so plots of one page share their x axis). */
  height?: number | undefined;
  /** Frequencies labelled on the x axis besides the 1-2-5 steps (the profile's ends). */
  xMarks?: number[] | undefined;
  /** Text placed at data points (mixed-mode tones: required and measured peak). */
  notes?: { x: number; y: number; text: string; id: string }[] | undefined;
}

const W = 720;
const DEFAULT_H = 340;
const M = { top: 40, right: 16, bottom: 44, left: 70 };

/**
 * A line of more points than a page can show, thinned per pixel column: each column keeps its first,
 * lowest, highest and last point, in order (min/max decimation, common practice for plotting long
 * records), so every peak and notch is drawn where it is. A line with at most 2 points per column is kept whole.
 * A 2-million-line PSD becomes at most 4 points per column of the plot (about 2500), not 2 million.
 */
export function thinLine(pts: (readonly [number, number])[]): (readonly [number, number])[] {
  if (pts.length <= 2 * (W - M.left - M.right)) return pts;
  const out: (readonly [number, number])[] = [];
  let i = 0;
  while (i < pts.length) {
    const col = Math.floor(pts[i]![0]);
    let j = i;
    let lo = i;
    let hi = i;
    while (j < pts.length && Math.floor(pts[j]![0]) === col) {
      if (pts[j]![1] < pts[lo]![1]) lo = j;
      if (pts[j]![1] > pts[hi]![1]) hi = j;
      j++;
    }
    for (const k of [...new Set([i, lo, hi, j - 1])].sort((a, b) => a - b)) out.push(pts[k]!);
    i = j;
  }
  return out;
}

/**
 * A band (x, y0, y1) thinned per pixel column: the column's outermost y0 and y1, so the band never looks narrower than
 * it is.
 */
export function thinBand(pts: (readonly [number, number, number])[]): (readonly [number, number, number])[] {
  if (pts.length <= 2 * (W - M.left - M.right)) return pts;
  const out: (readonly [number, number, number])[] = [];
  const down = pts[0]![1] >= pts[0]![2];
  let i = 0;
  while (i < pts.length) {
    const col = Math.floor(pts[i]![0]);
    let y0 = pts[i]![1];
    let y1 = pts[i]![2];
    let j = i;
    let xs = 0;
    while (j < pts.length && Math.floor(pts[j]![0]) === col) {
      // Screen y grows downward: the band's lower edge is the larger y (taken from the first point's order).
      const [, a, b] = pts[j]!;
      y0 = down ? Math.max(y0, a) : Math.min(y0, a);
      y1 = down ? Math.min(y1, b) : Math.max(y1, b);
      xs += pts[j]![0];
      j++;
    }
    out.push([xs / (j - i), y0, y1]);
    i = j;
  }
  return out;
}

/**
 * Text for HTML and SVG: the five markup characters as entities, and every control, line separator and bidi
 * override or isolate made visible first (printable.ts), as on the terminal: a title's U+202E cannot reverse the
 * verdict word after it in the page's <title>, nor a tab or newline pass unseen.
 */
export function escapeXml(s: string): string {
  return printable(s).replace(
    /[&<>"']/g,
    (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!,
  );
}

/**
 * Ticks of a log axis: every 1-2-5 step labelled when the axis spans at most four decades (decades only
 * beyond), the other d3 log ticks as minor grid lines, and any `marks` (the profile's ends) labelled too.
 * A 1-2-5 label that would touch a mark's label is dropped.
 */
function logTicks(
  s: ScaleContinuousNumeric<number, number>,
  count: number,
  marks: number[] = [],
  minGapPx = 26,
): { major: number[]; minor: number[] } {
  const [d0, d1] = s.domain() as [number, number];
  const decades = Math.log10(d1 / d0);
  const all = s.ticks(count);
  const mant = (t: number) => t / 10 ** Math.floor(Math.log10(t) + 1e-9);
  const near = (a: number, b: number) => Math.abs(a - b) < 1e-6;
  const inside = marks.filter((m) => m >= d0 * (1 - 1e-9) && m <= d1 * (1 + 1e-9));
  let major = all.filter((t) => near(mant(t), 1) || (decades <= 4 && (near(mant(t), 2) || near(mant(t), 5))));
  major = major.filter((t) => inside.every((m) => Math.abs(s(m) - s(t)) >= minGapPx || near(m / t, 1)));
  for (const m of inside) if (!major.some((t) => near(m / t, 1))) major.push(m);
  major.sort((a, b) => a - b);
  return { major, minor: all.filter((t) => !major.some((m) => near(m / t, 1))) };
}

/**
 * One number style per axis: plain decimals when every label fits them (0.001 to 99999), otherwise
 * every label as a power of ten (2×10⁻³), so an axis never mixes "0.001" with "10⁻⁴".
 */
export function axisLabels(ticks: number[]): string[] {
  const plain = ticks.every((t) => t === 0 || (Math.abs(t) >= 1e-3 && Math.abs(t) < 1e5));
  return ticks.map((t) => {
    if (plain || t === 0) return String(Number(t.toPrecision(4)));
    const e = Math.floor(Math.log10(Math.abs(t)) + 1e-9);
    const m = Number((t / 10 ** e).toPrecision(3));
    return `${m === 1 ? "" : `${m}×`}10${superscript(e)}`;
  });
}

function superscript(n: number): string {
  const map: Record<string, string> = {
    "-": "⁻",
    "0": "⁰",
    "1": "¹",
    "2": "²",
    "3": "³",
    "4": "⁴",
    "5": "⁵",
    "6": "⁶",
    "7": "⁷",
    "8": "⁸",
    "9": "⁹",
  };
  return String(n)
    .split("")
    .map((c) => map[c] ?? c)
    .join("");
}

/** A plot's height, scales and the tests every part of it draws with. */
interface PlotFrame {
  H: number;
  xLog: boolean;
  x: ScaleContinuousNumeric<number, number>;
  y: ScaleContinuousNumeric<number, number>;
  /** x inside the plotted domain. */
  inX: (v: number) => boolean;
  /** y drawable: finite, and positive on a log axis. */
  ok: (v: number) => boolean;
  /** Screen y held inside the plot's frame. */
  clampY: (v: number) => number;
}

export function svgPlot(p: PlotSpec): string {
  const H = p.height ?? DEFAULT_H;
  const xLog = p.xLog !== false;
  const x = (xLog ? scaleLog() : scaleLinear()).domain(p.xDomain).range([M.left, W - M.right]);
  const y = (p.yLog ? scaleLog() : scaleLinear()).domain(p.yDomain).range([H - M.bottom, M.top]);
  const f: PlotFrame = {
    H,
    xLog,
    x,
    y,
    inX: (v: number) => v >= p.xDomain[0] && v <= p.xDomain[1],
    ok: (v: number) => Number.isFinite(v) && (!p.yLog || v > 0),
    clampY: (v: number) => Math.max(M.top, Math.min(H - M.bottom, y(v))),
  };
  const out: string[] = [];
  out.push(
    `<svg id="${escapeXml(p.id)}" class="plot" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeXml(p.title)}" xmlns="http://www.w3.org/2000/svg">`,
  );
  out.push(`<text class="plot-title" x="${M.left}" y="16">${escapeXml(p.title)}</text>`);
  out.push(...xGrid(p, f), ...yGrid(p, f), ...frameAndLabels(p, f));
  out.push(`<g clip-path="url(#${p.id}-clip)">`);
  for (const s of p.series) out.push(seriesPath(s, f));
  out.push("</g>");
  out.push(...ruleLines(p, f), ...noteMarks(p, f), ...legend(p));
  out.push("</svg>");
  return out.join("\n");
}

/** The x axis's grid lines and tick labels (log: 1-2-5 steps and the marks; linear: d3's ticks). */
function xGrid(p: PlotSpec, f: PlotFrame): string[] {
  const { H, x } = f;
  const out: string[] = [];
  const xt = f.xLog ? logTicks(x, 10, p.xMarks) : { major: x.ticks(10), minor: [] as number[] };
  for (const t of xt.minor)
    out.push(
      `<line class="grid minor" x1="${x(t).toFixed(1)}" x2="${x(t).toFixed(1)}" y1="${M.top}" y2="${H - M.bottom}"/>`,
    );
  const xl = axisLabels(xt.major);
  xt.major.forEach((t, i) => {
    out.push(`<line class="grid" x1="${x(t).toFixed(1)}" x2="${x(t).toFixed(1)}" y1="${M.top}" y2="${H - M.bottom}"/>`);
    out.push(
      `<text class="tick x-tick" x="${x(t).toFixed(1)}" y="${H - M.bottom + 16}" text-anchor="middle">${xl[i]}</text>`,
    );
  });
  return out;
}

/** The y axis's grid lines and tick labels (log: 1-2-5 steps, minor lines between; linear: d3's ticks, zero marked). */
function yGrid(p: PlotSpec, f: PlotFrame): string[] {
  const { y } = f;
  const out: string[] = [];
  if (p.yLog) {
    const yt = logTicks(y, 8, [], 12);
    for (const t of yt.minor)
      out.push(
        `<line class="grid minor" x1="${M.left}" x2="${W - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`,
      );
    const yl = axisLabels(yt.major);
    yt.major.forEach((t, i) => {
      out.push(
        `<line class="grid" x1="${M.left}" x2="${W - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`,
      );
      out.push(
        `<text class="tick y-tick" x="${M.left - 6}" y="${(y(t) + 4).toFixed(1)}" text-anchor="end">${yl[i]}</text>`,
      );
    });
  } else {
    const yt = y.ticks(8);
    const yl = axisLabels(yt);
    yt.forEach((t, i) => {
      out.push(
        `<line class="grid${t === 0 ? " zero" : ""}" x1="${M.left}" x2="${W - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`,
      );
      out.push(
        `<text class="tick y-tick" x="${M.left - 6}" y="${(y(t) + 4).toFixed(1)}" text-anchor="end">${yl[i]}</text>`,
      );
    });
  }
  return out;
}

/** The frame, both axis labels and the clip path the series are drawn through. */
function frameAndLabels(p: PlotSpec, f: PlotFrame): string[] {
  const { H } = f;
  return [
    `<rect class="frame" x="${M.left}" y="${M.top}" width="${W - M.left - M.right}" height="${H - M.top - M.bottom}"/>`,
    `<text class="axis-label" x="${(M.left + W - M.right) / 2}" y="${H - 8}" text-anchor="middle">${escapeXml(p.xLabel)}</text>`,
    `<text class="axis-label" transform="translate(16 ${(M.top + H - M.bottom) / 2}) rotate(-90)" text-anchor="middle">${escapeXml(p.yLabel)}</text>`,
    `<clipPath id="${escapeXml(p.id)}-clip"><rect x="${M.left}" y="${M.top}" width="${W - M.left - M.right}" height="${H - M.top - M.bottom}"/></clipPath>`,
  ];
}

/**
 * One series as a <path>: markers, a filled band (y to y2) or a line, thinned per pixel column; its drawn and plotted
 * point counts.
 */
function seriesPath(s: Series, f: PlotFrame): string {
  const { x, clampY, ok } = f;
  const idx: number[] = [];
  for (let i = 0; i < s.x.length; i++)
    if (f.inX(s.x[i]!) && ok(s.y[i]!) && (s.y2 === undefined || ok(s.y2[i]!))) idx.push(i);
  let d: string | null;
  let drawn: number;
  if (s.markers) {
    // A small diamond per point: visible in greyscale and where lines overlap. One per tenth of a pixel.
    const seen = new Set<string>();
    const marks: string[] = [];
    for (const i of idx) {
      const px = x(s.x[i]!).toFixed(1);
      const py = (clampY(s.y[i]!) - 3.5).toFixed(1);
      if (seen.has(`${px},${py}`)) continue;
      seen.add(`${px},${py}`);
      marks.push(`M${px},${py}l3.5,3.5l-3.5,3.5l-3.5,-3.5Z`);
    }
    d = marks.join("");
    drawn = marks.length;
  } else if (s.y2 !== undefined) {
    const pts = thinBand(idx.map((i) => [x(s.x[i]!), clampY(s.y[i]!), clampY(s.y2![i]!)] as const));
    d = area<readonly [number, number, number]>()
      .x((q) => q[0])
      .y0((q) => q[1])
      .y1((q) => q[2])(pts);
    drawn = pts.length;
  } else {
    const pts = thinLine(idx.map((i) => [x(s.x[i]!), clampY(s.y[i]!)] as const));
    d = line<readonly [number, number]>()
      .x((q) => q[0])
      .y((q) => q[1])(pts);
    drawn = pts.length;
  }
  return `<path class="${escapeXml(s.className)}" data-series="${escapeXml(s.id)}" data-points="${drawn}" d="${d ?? ""}" data-lines="${idx.length}"/>`;
}

/**
 * Horizontal reference lines (an event threshold): dashed across the plot, each with its value for readers and tests.
 */
function ruleLines(p: PlotSpec, f: PlotFrame): string[] {
  const out: string[] = [];
  for (const v of p.rules ?? []) {
    if (!f.ok(v) || v < Math.min(...p.yDomain) || v > Math.max(...p.yDomain)) continue;
    out.push(
      `<line class="limit rule" data-rule="${v}" x1="${M.left}" x2="${W - M.right}" y1="${f.y(v).toFixed(1)}" y2="${f.y(v).toFixed(1)}"/>`,
    );
  }
  return out;
}

/**
 * Text at data points (mixed-mode tones), each on a short tick above its point, to its right unless near the right
 * edge.
 */
function noteMarks(p: PlotSpec, f: PlotFrame): string[] {
  const out: string[] = [];
  for (const t of p.notes ?? []) {
    if (!f.inX(t.x) || !f.ok(t.y)) continue;
    const px = f.x(t.x);
    const py = f.clampY(t.y);
    const right = px < W - M.right - 180;
    out.push(
      `<g class="plot-note" data-note="${escapeXml(t.id)}"><line class="note-tick" x1="${px.toFixed(1)}" x2="${px.toFixed(1)}" y1="${(py - 4).toFixed(1)}" y2="${Math.max(M.top, py - 16).toFixed(1)}"/><text class="note-text" x="${(px + (right ? 3 : -3)).toFixed(1)}" y="${Math.max(M.top + 10, py - 18).toFixed(1)}" text-anchor="${right ? "start" : "end"}">${escapeXml(t.text)}</text></g>`,
    );
  }
  return out;
}

/** The legend: every labelled series, right-aligned above the plot, a line or a marker for its key. */
function legend(p: PlotSpec): string[] {
  const out: string[] = [];
  let lx = W - M.right - 8;
  const items = p.series.filter((s) => s.label !== "").reverse();
  for (const s of items) {
    const w = 28 + 6.2 * s.label.length;
    lx -= w;
    const key = s.markers
      ? `<path class="${escapeXml(s.className)} key" d="M${lx + 10},${M.top - 13.5}l3.5,3.5l-3.5,3.5l-3.5,-3.5Z"/>`
      : `<line class="${escapeXml(s.className)} key" x1="${lx}" x2="${lx + 20}" y1="${M.top - 10}" y2="${M.top - 10}"/>`;
    out.push(
      `<g class="legend">${key}<text class="legend-text" x="${lx + 24}" y="${M.top - 6}">${escapeXml(s.label)}</text></g>`,
    );
  }
  return out;
}

/** Histogram bars and a curve over a linear x axis. */
export function svgHistogram(
  id: string,
  title: string,
  xLabel: string,
  edges: number[],
  density: number[],
  curve: { x: number[]; y: number[] },
): string {
  const w = 720;
  const h = 260;
  if (density.length === 0) return `<p class="muted">No histogram (no finite samples).</p>`;
  const x = scaleLinear()
    .domain([edges[0]!, edges[edges.length - 1]!])
    .range([M.left, w - M.right]);
  const top = maxOf(density, curve.y) * 1.1;
  const y = scaleLinear()
    .domain([0, top])
    .range([h - M.bottom, M.top]);
  const out = [
    `<svg id="${escapeXml(id)}" class="plot" viewBox="0 0 ${w} ${h}" width="${w}" height="${h}" role="img" aria-label="${escapeXml(title)}" xmlns="http://www.w3.org/2000/svg">`,
  ];
  out.push(`<text class="plot-title" x="${M.left}" y="16">${escapeXml(title)}</text>`);
  const xt = x.ticks(10);
  const xl = axisLabels(xt);
  xt.forEach((t, i) =>
    out.push(
      `<text class="tick x-tick" x="${x(t).toFixed(1)}" y="${h - M.bottom + 16}" text-anchor="middle">${xl[i]}</text>`,
    ),
  );
  const yt = y.ticks(5);
  const yl = axisLabels(yt);
  yt.forEach((t, i) => {
    out.push(`<line class="grid" x1="${M.left}" x2="${w - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`);
    out.push(
      `<text class="tick y-tick" x="${M.left - 6}" y="${(y(t) + 4).toFixed(1)}" text-anchor="end">${yl[i]}</text>`,
    );
  });
  const bars = density
    .map(
      (d, i) =>
        `M${x(edges[i]!).toFixed(1)},${y(0).toFixed(1)}V${y(d).toFixed(1)}H${x(edges[i + 1]!).toFixed(1)}V${y(0).toFixed(1)}Z`,
    )
    .join("");
  out.push(`<path class="bars" data-series="histogram" data-points="${density.length}" d="${bars}"/>`);
  const d = line<number>()
    .x((i) => x(curve.x[i]!))
    .y((i) => y(curve.y[i]!))(curve.x.map((_, i) => i));
  out.push(`<path class="gauss" data-series="gaussian" data-points="${curve.x.length}" d="${d ?? ""}"/>`);
  out.push(
    `<rect class="frame" x="${M.left}" y="${M.top}" width="${w - M.left - M.right}" height="${h - M.top - M.bottom}"/>`,
  );
  out.push(
    `<text class="axis-label" x="${(M.left + w - M.right) / 2}" y="${h - 8}" text-anchor="middle">${escapeXml(xLabel)}</text>`,
  );
  out.push(
    `<text class="axis-label" transform="translate(16 ${(M.top + h - M.bottom) / 2}) rotate(-90)" text-anchor="middle">probability density</text>`,
  );
  out.push("</svg>");
  return out.join("\n");
}
