// The report's three charts, drawn from plain data prepared by report-data.ts:
// 1. degree length against sin²φ: each arc's mean degree length s/|Δφ| at its mid latitude with
//    ±1σ bars, the fitted figure's degree length M(φ)·π/180 and its 95 % band;
// 2. the arcs' standardized residuals in latitude order, with the ±threshold lines;
// 3. latitude repeats per station: each reading's residual from its station's estimate.
import { escapeHtml } from './html-escape.ts';
import { axes, band, niceTicks, paddedRange, PALETTE, points, polyline, svg, sx, sy, type Frame, type Point } from './report-svg.ts';

export interface DegreePoint {
  label: string; x: number; y: number; sigmaY: number; suspect: boolean; excluded: boolean;
  /** The fitted figure's mean degree length over the same arc, a·|g(φ₂) − g(φ₁)|/|Δφ|, and its 95 % half-width (null without a fit). */
  fittedY: number | null; fittedHalfWidth95: number | null;
}
export interface CurvePoint { x: number; y: number; lower: number; upper: number }
export interface ArcResidual { label: string; z: number; suspect: boolean; excluded: boolean }
export interface StationRepeats { code: string; readings: { id: string; residualArcsec: number; suspect: boolean; excluded: boolean }[] }

const colourOf = (suspect: boolean, excluded: boolean): string => (excluded ? PALETTE.excluded : suspect ? PALETTE.suspect : PALETTE.point);

function legend(items: readonly [string, string, boolean][], x: number, y: number): string {
  return items.map(([label, colour, hollow], i) =>
    `<circle cx="${x}" cy="${y + i * 14}" r="3.2" fill="${hollow ? 'none' : colour}" stroke="${colour}" stroke-width="1.2"/><text x="${x + 8}" y="${y + i * 14 + 3.5}" font-size="10">${escapeHtml(label)}</text>`).join('');
}

export function degreeLengthChart(data: readonly DegreePoint[], curve: readonly CurvePoint[], curveLabel: string): string {
  const ys = [...data.flatMap((d) => [d.y - d.sigmaY, d.y + d.sigmaY]), ...curve.flatMap((c) => [c.lower, c.upper])];
  const [yMin, yMax] = paddedRange(ys);
  const xs = [...data.map((d) => d.x), ...curve.map((c) => c.x)];
  const [xMin, xMax] = paddedRange(xs, 0.03);
  const top: Frame = { width: 640, height: 250, left: 64, right: 14, top: 12, bottom: 38, xMin, xMax, yMin, yMax };
  const colour = (d: DegreePoint): string => colourOf(d.suspect, d.excluded);
  const upper = [
    axes(top, 'sin²φ (mid latitude of each arc)', 'degree length (m per degree)'),
    curve.length > 1 ? band(top, curve.map((c) => [c.x, c.upper]), curve.map((c) => [c.x, c.lower]), PALETTE.band) : '',
    curve.length > 1 ? polyline(top, curve.map((c) => [c.x, c.y]), PALETTE.fit) : '',
    points(top, data.map((d): Point => ({ x: d.x, y: d.y, sigma: d.sigmaY, colour: colour(d), hollow: d.excluded, title: `${d.label}: ${d.y.toFixed(2)} ± ${d.sigmaY.toFixed(2)} m/degree` }))),
    legend([['arc (±1σ)', PALETTE.point, false], ['suspect', PALETTE.suspect, false], ['excluded', PALETTE.excluded, true]], top.left + 10, top.top + 12),
    `<text x="${top.width - top.right - 6}" y="${top.height - top.bottom - 8}" text-anchor="end" font-size="10" fill="${PALETTE.fit}">${escapeHtml(curveLabel)}</text>`,
  ].join('');
  // Lower panel: the same arcs as departures from the fitted figure's mean degree length over each
  // arc, where the ±1σ bars and the 95 % band are visible (in the upper panel they are thinner than a line).
  const fitted = data.filter((d) => d.fittedY !== null);
  let lower = '';
  if (fitted.length > 0) {
    const dev = fitted.map((d) => d.y - (d.fittedY ?? 0));
    const hw = fitted.map((d) => d.fittedHalfWidth95 ?? 0);
    const [dMin, dMax] = paddedRange([...dev.map((v, i) => v - fitted[i].sigmaY), ...dev.map((v, i) => v + fitted[i].sigmaY), ...hw, ...hw.map((v) => -v)]);
    const low: Frame = { width: 640, height: 200, left: 64, right: 14, top: 8, bottom: 38, xMin, xMax, yMin: dMin, yMax: dMax };
    const sorted = fitted.map((d, i) => ({ x: d.x, h: hw[i] })).sort((p, q) => p.x - q.x);
    lower = `<g transform="translate(0 ${top.height})">${[
      axes(low, 'sin²φ', 'observed − fitted (m per degree)'),
      sorted.length > 1 ? band(low, sorted.map((p) => [p.x, p.h]), sorted.map((p) => [p.x, -p.h]), PALETTE.band) : '',
      polyline(low, [[xMin, 0], [xMax, 0]], PALETTE.fit, 1),
      points(low, fitted.map((d, i): Point => ({ x: d.x, y: dev[i], sigma: d.sigmaY, colour: colour(d), hollow: d.excluded, title: `${d.label}: ${dev[i].toFixed(2)} ± ${d.sigmaY.toFixed(2)} m/degree from the fit` }))),
    ].join('')}</g>`;
  }
  const frame: Frame = { ...top, height: top.height + (lower ? 200 : 0) };
  return svg(frame, 'Degree length against sin²φ with the fitted figure and its 95 % band', upper + lower);
}

export function arcResidualChart(data: readonly ArcResidual[], threshold: number): string {
  const zMax = Math.max(threshold * 1.25, ...data.map((d) => Math.abs(d.z)).filter(Number.isFinite)) * 1.08;
  const n = Math.max(1, data.length);
  const f: Frame = { width: 640, height: 240, left: 48, right: 14, top: 12, bottom: 54, xMin: 0, xMax: n, yMin: -zMax, yMax: zMax };
  const slot = (f.width - f.left - f.right) / n;
  const bars = data.map((d, i) => {
    const x0 = sx(f, i) + slot * 0.18;
    const z = Number.isFinite(d.z) ? Math.max(-zMax, Math.min(zMax, d.z)) : 0;
    const y0 = sy(f, Math.max(0, z));
    const h = Math.abs(sy(f, z) - sy(f, 0));
    const colour = colourOf(d.suspect, d.excluded);
    const label = `<text transform="translate(${(x0 + slot * 0.32).toFixed(2)} ${(f.height - f.bottom + 10).toFixed(2)}) rotate(45)" font-size="9">${escapeHtml(d.label)}</text>`;
    return `<rect x="${x0.toFixed(2)}" y="${y0.toFixed(2)}" width="${(slot * 0.64).toFixed(2)}" height="${h.toFixed(2)}" fill="${d.excluded ? 'none' : colour}" stroke="${colour}"><title>${escapeHtml(`${d.label}: ${d.z.toFixed(2)}σ`)}</title></rect>${label}`;
  }).join('');
  const lines = [threshold, -threshold].map((t) => `<line x1="${f.left}" y1="${sy(f, t).toFixed(2)}" x2="${f.width - f.right}" y2="${sy(f, t).toFixed(2)}" stroke="${PALETTE.suspect}" stroke-dasharray="4 3" stroke-width="1"/>`).join('');
  const yTicks = niceTicks(-zMax, zMax);
  const body = [axes(f, '', 'standardized residual (σ)', [], yTicks), lines, bars,
    `<line x1="${f.left}" y1="${sy(f, 0).toFixed(2)}" x2="${f.width - f.right}" y2="${sy(f, 0).toFixed(2)}" stroke="${PALETTE.ink}" stroke-width="0.8"/>`].join('');
  return svg(f, `Standardized residuals of the arcs, suspect beyond ±${threshold}σ`, body);
}

export function latitudeRepeatsChart(data: readonly StationRepeats[]): string {
  const values = data.flatMap((s) => s.readings.map((r) => r.residualArcsec));
  const [yMin, yMax] = paddedRange([...values, 0]);
  const n = Math.max(1, data.length);
  const f: Frame = { width: 640, height: 240, left: 52, right: 14, top: 12, bottom: 40, xMin: 0, xMax: n, yMin, yMax };
  const slot = (f.width - f.left - f.right) / n;
  const pts: Point[] = [];
  data.forEach((s, i) => {
    const k = s.readings.length;
    s.readings.forEach((r, j) => {
      // Spread the repeats across the middle half of the station's slot so equal values stay visible.
      const jitter = k > 1 ? (j / (k - 1) - 0.5) * 0.5 : 0;
      pts.push({ x: i + 0.5 + jitter, y: r.residualArcsec, colour: colourOf(r.suspect, r.excluded), hollow: r.excluded, title: `${s.code} ${r.id}: ${r.residualArcsec.toFixed(3)}″` });
    });
  });
  const labels = data.map((s, i) => `<text x="${(f.left + slot * (i + 0.5)).toFixed(2)}" y="${f.height - f.bottom + 15}" text-anchor="middle" font-size="10">${escapeHtml(s.code)}</text>`).join('');
  const zero = `<line x1="${f.left}" y1="${sy(f, 0).toFixed(2)}" x2="${f.width - f.right}" y2="${sy(f, 0).toFixed(2)}" stroke="${PALETTE.fit}" stroke-width="1"/>`;
  const body = [axes(f, 'station', 'reading − station latitude (″)', []), zero, points(f, pts, 2.6), labels].join('');
  return svg(f, 'Latitude repeats per station: each reading against its station estimate', body);
}
