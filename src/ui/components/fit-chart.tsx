// Degree length against sin²φ: the fitted curve, one point per arc, and a residual stick from the
// curve to each point. Suspects are drawn as open diamonds, excluded arcs as hollow grey circles,
// so the three states differ in shape as well as colour (readable in sunlight and for colour-blind
// crews). The chart data comes from the worker (fit-chart-data.ts); this only scales and draws.
import type { FitChartData } from '../../worker/index.ts';

const W = 340, H = 220, PAD_L = 54, PAD_R = 10, PAD_T = 12, PAD_B = 34;

function ticks(lo: number, hi: number, n: number): number[] {
  const step = (hi - lo) / n;
  return Array.from({ length: n + 1 }, (_, i) => lo + i * step);
}

export function FitChart({ data, onPick }: { data: FitChartData; onPick?: (readingId: string) => void }) {
  if (!data.points.length) return <p className="af-hint">The chart appears once the fit has at least two arcs at different latitudes.</p>;
  const xs = [...data.points.map((p) => p.x), ...data.curve.map((c) => c.x)];
  const ys = [...data.points.map((p) => p.y), ...data.curve.map((c) => c.y)];
  const x0 = Math.min(...xs), x1 = Math.max(...xs);
  const yPad = Math.max((Math.max(...ys) - Math.min(...ys)) * 0.08, 1);
  const y0 = Math.min(...ys) - yPad, y1 = Math.max(...ys) + yPad;
  const sx = (x: number) => PAD_L + ((x - x0) / (x1 - x0 || 1)) * (W - PAD_L - PAD_R);
  const sy = (y: number) => H - PAD_B - ((y - y0) / (y1 - y0 || 1)) * (H - PAD_T - PAD_B);
  const path = data.curve.map((c, i) => `${i ? 'L' : 'M'}${sx(c.x).toFixed(1)},${sy(c.y).toFixed(1)}`).join(' ');
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="af-chart" role="img" data-testid="fit-chart"
      aria-label={`Degree length against sin squared latitude, ${data.points.length} arcs, fitted curve`}>
      {ticks(y0, y1, 4).map((t) => (
        <g key={`y${t}`}>
          <line x1={PAD_L} x2={W - PAD_R} y1={sy(t)} y2={sy(t)} stroke="var(--af-chart-grid)" strokeWidth={0.6} />
          <text x={PAD_L - 4} y={sy(t) + 4} textAnchor="end">{t.toFixed(0)}</text>
        </g>
      ))}
      {ticks(x0, x1, 4).map((t) => (
        <text key={`x${t}`} x={sx(t)} y={H - PAD_B + 14} textAnchor="middle">{t.toFixed(2)}</text>
      ))}
      <text x={(PAD_L + W - PAD_R) / 2} y={H - 4} textAnchor="middle">{data.xLabel}</text>
      <text x={12} y={(PAD_T + H - PAD_B) / 2} textAnchor="middle" transform={`rotate(-90 12 ${(PAD_T + H - PAD_B) / 2})`}>{data.yLabel}</text>
      <path d={path} fill="none" stroke="var(--af-chart-curve)" strokeWidth={2} />
      {data.points.map((p) => {
        const cx = sx(p.x), cy = sy(p.y), base = sy(p.y - p.residualPerDeg);
        const colour = p.excluded ? 'var(--af-excluded)' : p.suspect ? 'var(--af-suspect)' : 'var(--af-chart-curve)';
        return (
          <g key={p.readingId} onClick={() => onPick?.(p.readingId)} style={{ cursor: onPick ? 'pointer' : undefined }}
            data-testid="chart-point" data-suspect={p.suspect ? '1' : '0'}>
            <title>{`${p.label}: residual ${p.residualPerDeg.toFixed(2)} m/° (${p.standardizedResidual.toFixed(1)}σ)`}</title>
            <line x1={cx} x2={cx} y1={base} y2={cy} stroke={colour} strokeWidth={1.4} />
            {p.suspect && !p.excluded
              ? <path d={`M${cx},${cy - 7} L${cx + 7},${cy} L${cx},${cy + 7} L${cx - 7},${cy} Z`} fill="none" stroke={colour} strokeWidth={2.2} />
              : <circle cx={cx} cy={cy} r={p.excluded ? 5 : 4} fill={p.excluded ? 'none' : colour} stroke={colour} strokeWidth={1.6} />}
            {/* a transparent target big enough for a finger */}
            <circle cx={cx} cy={cy} r={16} fill="transparent" />
          </g>
        );
      })}
    </svg>
  );
}
