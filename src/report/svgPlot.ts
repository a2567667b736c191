import { scaleLinear, scaleLog, type ScaleContinuousNumeric } from "d3-scale";
import { area, line } from "d3-shape";
import { maxOf } from "./format.js";

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
}

export interface PlotSpec {
  id: string;
  title: string;
  xLabel: string;
  yLabel: string;
  xDomain: [number, number];
  yDomain: [number, number];
  yLog: boolean;
  series: Series[];
  /** Horizontal reference lines (linear plots). */
  rules?: number[] | undefined;
}

const W = 720;
const H = 340;
const M = { top: 40, right: 16, bottom: 44, left: 70 };

export function escapeXml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

/** Tick labels on a log axis: 1, 2, 5 of each decade, in plain or exponent form. */
function logTicks(s: ScaleContinuousNumeric<number, number>, count: number): { major: number[]; minor: number[] } {
  const all = s.ticks(count);
  const major = all.filter((t) => {
    const m = t / 10 ** Math.floor(Math.log10(t) + 1e-9);
    return Math.abs(m - 1) < 1e-6 || (all.length < 12 && (Math.abs(m - 2) < 1e-6 || Math.abs(m - 5) < 1e-6));
  });
  return { major, minor: all.filter((t) => !major.includes(t)) };
}

function tickLabel(t: number): string {
  if (t >= 1e-3 && t < 1e5) return String(Number(t.toPrecision(3)));
  const e = Math.floor(Math.log10(t) + 1e-9);
  const m = t / 10 ** e;
  return `${Math.abs(m - 1) < 1e-6 ? "" : `${Number(m.toPrecision(2))}×`}10${superscript(e)}`;
}

function superscript(n: number): string {
  const map: Record<string, string> = { "-": "⁻", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };
  return String(n).split("").map((c) => map[c] ?? c).join("");
}

export function svgPlot(p: PlotSpec): string {
  const x = scaleLog().domain(p.xDomain).range([M.left, W - M.right]);
  const y = (p.yLog ? scaleLog() : scaleLinear()).domain(p.yDomain).range([H - M.bottom, M.top]);
  const inX = (v: number) => v >= p.xDomain[0] && v <= p.xDomain[1];
  const ok = (v: number) => Number.isFinite(v) && (!p.yLog || v > 0);
  const clampY = (v: number) => Math.max(M.top, Math.min(H - M.bottom, y(v)));
  const out: string[] = [];
  out.push(`<svg id="${p.id}" class="plot" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${escapeXml(p.title)}" xmlns="http://www.w3.org/2000/svg">`);
  out.push(`<text class="plot-title" x="${M.left}" y="16">${escapeXml(p.title)}</text>`);
  // Grid and ticks.
  const xt = logTicks(x, 10);
  for (const t of xt.minor) out.push(`<line class="grid minor" x1="${x(t).toFixed(1)}" x2="${x(t).toFixed(1)}" y1="${M.top}" y2="${H - M.bottom}"/>`);
  for (const t of xt.major) {
    out.push(`<line class="grid" x1="${x(t).toFixed(1)}" x2="${x(t).toFixed(1)}" y1="${M.top}" y2="${H - M.bottom}"/>`);
    out.push(`<text class="tick" x="${x(t).toFixed(1)}" y="${H - M.bottom + 16}" text-anchor="middle">${tickLabel(t)}</text>`);
  }
  if (p.yLog) {
    const yt = logTicks(y as ScaleContinuousNumeric<number, number>, 8);
    for (const t of yt.minor) out.push(`<line class="grid minor" x1="${M.left}" x2="${W - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`);
    for (const t of yt.major) {
      out.push(`<line class="grid" x1="${M.left}" x2="${W - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`);
      out.push(`<text class="tick" x="${M.left - 6}" y="${(y(t) + 4).toFixed(1)}" text-anchor="end">${tickLabel(t)}</text>`);
    }
  } else {
    for (const t of y.ticks(8)) {
      out.push(`<line class="grid${t === 0 ? " zero" : ""}" x1="${M.left}" x2="${W - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`);
      out.push(`<text class="tick" x="${M.left - 6}" y="${(y(t) + 4).toFixed(1)}" text-anchor="end">${Number(t.toPrecision(3))}</text>`);
    }
  }
  out.push(`<rect class="frame" x="${M.left}" y="${M.top}" width="${W - M.left - M.right}" height="${H - M.top - M.bottom}"/>`);
  out.push(`<text class="axis-label" x="${(M.left + W - M.right) / 2}" y="${H - 8}" text-anchor="middle">${escapeXml(p.xLabel)}</text>`);
  out.push(`<text class="axis-label" transform="translate(16 ${(M.top + H - M.bottom) / 2}) rotate(-90)" text-anchor="middle">${escapeXml(p.yLabel)}</text>`);
  out.push(`<clipPath id="${p.id}-clip"><rect x="${M.left}" y="${M.top}" width="${W - M.left - M.right}" height="${H - M.top - M.bottom}"/></clipPath>`);
  out.push(`<g clip-path="url(#${p.id}-clip)">`);
  for (const s of p.series) {
    const idx: number[] = [];
    for (let i = 0; i < s.x.length; i++) if (inX(s.x[i]!) && ok(s.y[i]!) && (s.y2 === undefined || ok(s.y2[i]!))) idx.push(i);
    let d: string | null;
    if (s.y2 !== undefined) {
      const y2 = s.y2;
      d = area<number>().x((i) => x(s.x[i]!)).y0((i) => clampY(s.y[i]!)).y1((i) => clampY(y2[i]!))(idx);
    } else {
      d = line<number>().x((i) => x(s.x[i]!)).y((i) => clampY(s.y[i]!))(idx);
    }
    out.push(`<path class="${s.className}" data-series="${s.id}" data-points="${idx.length}" d="${d ?? ""}"/>`);
  }
  out.push("</g>");
  // Legend.
  let lx = W - M.right - 8;
  const items = p.series.filter((s) => s.label !== "").reverse();
  for (const s of items) {
    const w = 28 + 6.2 * s.label.length;
    lx -= w;
    out.push(`<g class="legend"><line class="${s.className} key" x1="${lx}" x2="${lx + 20}" y1="${M.top - 10}" y2="${M.top - 10}"/><text class="legend-text" x="${lx + 24}" y="${M.top - 6}">${escapeXml(s.label)}</text></g>`);
  }
  out.push("</svg>");
  return out.join("\n");
}

/** Histogram bars and a curve over a linear x axis. */
export function svgHistogram(id: string, title: string, xLabel: string, edges: number[], density: number[], curve: { x: number[]; y: number[] }): string {
  const w = 720;
  const h = 260;
  if (density.length === 0) return `<p class="muted">No histogram (no finite samples).</p>`;
  const x = scaleLinear().domain([edges[0]!, edges[edges.length - 1]!]).range([M.left, w - M.right]);
  const top = maxOf(density, curve.y) * 1.1;
  const y = scaleLinear().domain([0, top]).range([h - M.bottom, M.top]);
  const out = [`<svg id="${id}" class="plot" viewBox="0 0 ${w} ${h}" width="${w}" height="${h}" role="img" aria-label="${escapeXml(title)}" xmlns="http://www.w3.org/2000/svg">`];
  out.push(`<text class="plot-title" x="${M.left}" y="16">${escapeXml(title)}</text>`);
  for (const t of x.ticks(10)) out.push(`<text class="tick" x="${x(t).toFixed(1)}" y="${h - M.bottom + 16}" text-anchor="middle">${Number(t.toPrecision(3))}</text>`);
  for (const t of y.ticks(5)) {
    out.push(`<line class="grid" x1="${M.left}" x2="${w - M.right}" y1="${y(t).toFixed(1)}" y2="${y(t).toFixed(1)}"/>`);
    out.push(`<text class="tick" x="${M.left - 6}" y="${(y(t) + 4).toFixed(1)}" text-anchor="end">${Number(t.toPrecision(3))}</text>`);
  }
  const bars = density.map((d, i) => `M${x(edges[i]!).toFixed(1)},${y(0).toFixed(1)}V${y(d).toFixed(1)}H${x(edges[i + 1]!).toFixed(1)}V${y(0).toFixed(1)}Z`).join("");
  out.push(`<path class="bars" data-series="histogram" data-points="${density.length}" d="${bars}"/>`);
  const d = line<number>().x((i) => x(curve.x[i]!)).y((i) => y(curve.y[i]!))(curve.x.map((_, i) => i));
  out.push(`<path class="gauss" data-series="gaussian" data-points="${curve.x.length}" d="${d ?? ""}"/>`);
  out.push(`<rect class="frame" x="${M.left}" y="${M.top}" width="${w - M.left - M.right}" height="${h - M.top - M.bottom}"/>`);
  out.push(`<text class="axis-label" x="${(M.left + w - M.right) / 2}" y="${h - 8}" text-anchor="middle">${escapeXml(xLabel)}</text>`);
  out.push(`<text class="axis-label" transform="translate(16 ${(M.top + h - M.bottom) / 2}) rotate(-90)" text-anchor="middle">probability density</text>`);
  out.push("</svg>");
  return out.join("\n");
}
