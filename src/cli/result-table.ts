// The readable form of a CampaignResult for the terminal: figure, coefficients, fit quality,
// stations, arcs, and the list of things for the crew to do. Plain text, fixed-width columns.
import type { CampaignRecords, CampaignResult } from '../campaign/index.ts';

function table(header: readonly string[], rows: readonly (readonly string[])[], rightAlign: readonly boolean[]): string {
  const widths = header.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: readonly string[]): string =>
    '  ' + cells.map((c, j) => (rightAlign[j] ? c.padStart(widths[j]) : c.padEnd(widths[j]))).join('  ').trimEnd();
  return [line(header), ...rows.map(line)].join('\n') + '\n';
}

const fixed = (v: number | null | undefined, decimals: number): string =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : v.toFixed(decimals);
const pm = (v: number | null | undefined, decimals: number): string => (v === null || v === undefined ? '' : `± ${fixed(v, decimals)}`);
const signed = (v: number, decimals: number): string => (v >= 0 ? '+' : '\u2212') + Math.abs(v).toFixed(decimals);

export function formatResultTable(records: CampaignRecords, result: CampaignResult): string {
  const out: string[] = [];
  out.push(`campaign   ${records.name}`);
  out.push(`           ${records.stations.length} stations, ${records.latitudeReadings.length} latitude readings, ${records.arcReadings.length} arc readings, ${records.exclusions?.length ?? 0} exclusions`);
  out.push(`fit        model ${result.model}, estimator ${result.estimator}, weighting ${result.weighting}, engine ${result.engineVersion}`);
  out.push(`status     ${result.status}${result.statusMessage ? ' — ' + result.statusMessage : ''}`);
  out.push(`iteration  ${result.iterations} iterations, ${result.converged ? 'converged' : 'NOT converged'}: ${result.reason}`);
  out.push('');
  const f = result.figure;
  if (f) {
    out.push('figure');
    out.push(table(['quantity', 'value', 'std. error', 'unit'], [
      ['a (semi-major axis)', fixed(f.semiMajorAxisM, 1), pm(f.semiMajorAxisStdM, 1), 'm'],
      ['1/f (inverse flattening)', fixed(f.inverseFlattening, 3), pm(f.inverseFlatteningStd, 3), ''],
      ['quadrant (equator to pole)', fixed(f.quadrantM, 1), pm(f.quadrantStdM, 1), 'm'],
      ['e² (eccentricity squared)', f.eccentricitySquared.toExponential(6), '', ''],
    ], [false, true, false, false]).trimEnd());
    out.push(`  ${f.inversion}`);
    out.push('');
  }
  if (result.coefficients.length > 0) {
    out.push('coefficients');
    out.push(table(['name', 'value', 'std. error', 'unit'],
      result.coefficients.map((c) => [c.name, c.name === 'flattening' ? c.value.toExponential(9) : fixed(c.value, 4), c.standardError === null ? '—' : c.name === 'flattening' ? c.standardError.toExponential(3) : fixed(c.standardError, 4), c.unit]),
      [false, true, true, false]));
  }
  if (result.modelError) out.push(`model error  ${result.modelError.statement}`, '');
  const q = result.quality;
  out.push(`fit quality  objective ${result.objective.toPrecision(6)}; residuals (${q.unit}): rms ${fixed(q.rms, 3)}, MAD ${fixed(q.mad, 3)}, max ${fixed(q.maxAbsResidual, 3)}` +
    (q.varianceFactor !== null ? `; σ₀² ${fixed(q.varianceFactor, 3)}` : '') +
    (q.chiSquare ? `; χ² ${fixed(q.chiSquare.statistic, 2)} on ${q.chiSquare.degreesOfFreedom} dof, p = ${q.chiSquare.pValue.toPrecision(3)} (${q.chiSquare.passes ? 'passes' : 'FAILS'})` : ''));
  out.push('');

  out.push('stations');
  out.push(table(['code', 'kind', 'latitude °', 'σ ″', 'n', 'spread ″', 'ξ ″', 'in fit'],
    result.stations.map((s) => [
      s.code, s.kind, fixed(s.latitudeDeg, 8), fixed(s.sigmaArcsec, 3), String(s.readingCount), fixed(s.spreadArcsec, 3),
      s.deflectionNorthArcsec === null ? '' : signed(s.deflectionNorthArcsec, 2), s.usedInFit === false ? 'no' : 'yes',
    ]), [false, false, true, true, true, true, true, false]));

  const arcs = result.readings.filter((r) => r.kind === 'arc');
  if (arcs.length > 0) {
    out.push(`arcs (residual in ${arcs[0].residualUnit})`);
    out.push(table(['id', 'residual', 'std.', 'flag'],
      arcs.map((r) => [r.id, signed(r.residual, 3), signed(r.standardizedResidual, 2), r.excluded ? 'excluded' : r.suspect ? 'SUSPECT' : r.usedInFit === false ? 'not used' : '']),
      [false, true, true, false]));
  }
  const todo = result.readings.filter((r) => r.hint !== '');
  out.push(todo.length === 0 ? 'nothing to re-observe' : 'to do');
  for (const r of todo) out.push(`  ${r.id}: ${r.hint}`);
  out.push('');
  return out.join('\n');
}
