// Minimal SVG plotting for the report: linear axes with "nice" ticks (1, 2, 5 × 10ᵏ steps, the
// usual choice of Heckbert, "Nice numbers for graph labels", Graphics Gems, 1990), points with
// error bars, polylines, a shaded band and labelled bars. Output is a self-contained <svg> string
// (no fonts, scripts or links), sized in CSS pixels and scaled to the page width by the report CSS.
import { escapeHtml } from './html-escape.ts';

export interface Frame {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
}

export const PALETTE = {
  ink: '#1f2933',
  grid: '#d9dee3',
  fit: '#0b7a75',
  band: '#0b7a75',
  point: '#1f2933',
  suspect: '#c2410c',
  excluded: '#8a949e',
} as const;

/** Nice tick values covering [lo, hi] with about `target` intervals. */
export function niceTicks(lo: number, hi: number, target = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / target;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const first = Math.ceil(lo / step - 1e-9) * step;
  const ticks: number[] = [];
  for (let k = 0; first + k * step <= hi + step * 1e-9; k++) ticks.push(Number((first + k * step).toPrecision(12)));
  return ticks;
}

/** Data range padded by a fraction on both sides (a flat range gets ±1 unit, or ±1 % of its value). */
export function paddedRange(values: readonly number[], pad = 0.06): [number, number] {
  const finite = values.filter(Number.isFinite);
  if (finite.length === 0) return [0, 1];
  let lo = Math.min(...finite);
  let hi = Math.max(...finite);
  if (hi === lo) {
    const d = Math.abs(lo) * 0.01 || 1;
    lo -= d;
    hi += d;
  }
  const d = (hi - lo) * pad;
  return [lo - d, hi + d];
}

export const sx = (f: Frame, x: number): number => f.left + ((x - f.xMin) / (f.xMax - f.xMin)) * (f.width - f.left - f.right);
export const sy = (f: Frame, y: number): number => f.height - f.bottom - ((y - f.yMin) / (f.yMax - f.yMin)) * (f.height - f.top - f.bottom);
const n2 = (v: number): string => v.toFixed(2);

function tickLabel(v: number, step: number): string {
  const decimals = Math.max(0, Math.min(6, -Math.floor(Math.log10(step) + 1e-9)));
  return v.toFixed(decimals);
}

export function axes(f: Frame, xLabel: string, yLabel: string, xTicks = niceTicks(f.xMin, f.xMax), yTicks = niceTicks(f.yMin, f.yMax)): string {
  const out: string[] = [];
  const xStep = xTicks.length > 1 ? xTicks[1] - xTicks[0] : 1;
  const yStep = yTicks.length > 1 ? yTicks[1] - yTicks[0] : 1;
  for (const t of yTicks) {
    const y = sy(f, t);
    out.push(`<line x1="${n2(f.left)}" y1="${n2(y)}" x2="${n2(f.width - f.right)}" y2="${n2(y)}" stroke="${PALETTE.grid}" stroke-width="0.8"/>`);
    out.push(`<text x="${n2(f.left - 6)}" y="${n2(y + 3.5)}" text-anchor="end" font-size="10">${escapeHtml(tickLabel(t, yStep))}</text>`);
  }
  for (const t of xTicks) {
    const x = sx(f, t);
    out.push(`<line x1="${n2(x)}" y1="${n2(f.height - f.bottom)}" x2="${n2(x)}" y2="${n2(f.height - f.bottom + 4)}" stroke="${PALETTE.ink}" stroke-width="0.8"/>`);
    out.push(`<text x="${n2(x)}" y="${n2(f.height - f.bottom + 15)}" text-anchor="middle" font-size="10">${escapeHtml(tickLabel(t, xStep))}</text>`);
  }
  out.push(`<rect x="${n2(f.left)}" y="${n2(f.top)}" width="${n2(f.width - f.left - f.right)}" height="${n2(f.height - f.top - f.bottom)}" fill="none" stroke="${PALETTE.ink}" stroke-width="0.8"/>`);
  out.push(`<text x="${n2((f.left + f.width - f.right) / 2)}" y="${n2(f.height - 4)}" text-anchor="middle" font-size="11">${escapeHtml(xLabel)}</text>`);
  out.push(`<text transform="translate(12 ${n2((f.top + f.height - f.bottom) / 2)}) rotate(-90)" text-anchor="middle" font-size="11">${escapeHtml(yLabel)}</text>`);
  return out.join('');
}

export function polyline(f: Frame, points: readonly [number, number][], colour: string, width = 1.6, dash = ''): string {
  const d = points.map(([x, y]) => `${n2(sx(f, x))},${n2(sy(f, y))}`).join(' ');
  return `<polyline points="${d}" fill="none" stroke="${colour}" stroke-width="${width}"${dash ? ` stroke-dasharray="${dash}"` : ''}/>`;
}

export function band(f: Frame, upper: readonly [number, number][], lower: readonly [number, number][], colour: string): string {
  const pts = [...upper, ...[...lower].reverse()].map(([x, y]) => `${n2(sx(f, x))},${n2(sy(f, y))}`).join(' ');
  return `<polygon points="${pts}" fill="${colour}" fill-opacity="0.18" stroke="none"/>`;
}

export interface Point { x: number; y: number; sigma?: number; colour: string; hollow?: boolean; title: string }

export function points(f: Frame, pts: readonly Point[], radius = 3.2): string {
  return pts.map((p) => {
    const cx = sx(f, p.x);
    const cy = sy(f, p.y);
    const bar = p.sigma !== undefined && p.sigma > 0
      ? `<line x1="${n2(cx)}" y1="${n2(sy(f, p.y - p.sigma))}" x2="${n2(cx)}" y2="${n2(sy(f, p.y + p.sigma))}" stroke="${p.colour}" stroke-width="1"/>`
      : '';
    const fill = p.hollow ? 'none' : p.colour;
    return `<g>${bar}<circle cx="${n2(cx)}" cy="${n2(cy)}" r="${radius}" fill="${fill}" stroke="${p.colour}" stroke-width="1.2"><title>${escapeHtml(p.title)}</title></circle></g>`;
  }).join('');
}

export function svg(f: Frame, title: string, body: string): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${f.width} ${f.height}" width="${f.width}" height="${f.height}" role="img" aria-label="${escapeHtml(title)}" font-family="sans-serif" fill="${PALETTE.ink}"><title>${escapeHtml(title)}</title>${body}</svg>`;
}
