// The printable campaign report: one self-contained HTML document (inline CSS and SVG, no
// scripts, fonts, images or links to fetch) that prints cleanly to PDF from any browser. Pure:
// ReportData in (report-data.ts), text out. Every value is escaped; numbers carry their units.
import type { CampaignResult, Figure } from '../campaign/result.ts';
import type { EstimatorId, ModelId } from '../campaign/records.ts';
import type { BootstrapSummary } from '../campaign/bootstrap.ts';
import { escapeHtml as esc, escapeWithStrong } from './html-escape.ts';
import { arcResidualChart, degreeLengthChart, latitudeRepeatsChart } from './report-charts.ts';
import { FIELD_CAUTIONS, LEGAL_NOTICE } from './report-notices.ts';
import type { ReportData } from './report-data.ts';

const ESTIMATOR_NAMES: Record<EstimatorId, string> = {
  'least-squares': 'least squares', 'least-absolute': 'least absolute deviations', minimax: 'minimax (Chebyshev)', huber: 'Huber (k = 1.345)', tukey: 'Tukey biweight (c = 4.685)',
};
const ESTIMATOR_REASONS: Record<EstimatorId, string> = {
  'least-squares': 'best when the errors are normal with the stated sigmas; gives the full covariance and the data-snooping tests, but one blunder pulls it.',
  'least-absolute': 'minimises the sum of weighted absolute residuals; an exact optimum that passes through as many arcs as parameters and resists a minority of blunders.',
  minimax: 'minimises the largest weighted residual; exact and useful to bound the worst arc, but the most sensitive to a single blunder.',
  huber: 'quadratic for residuals within 1.345σ and linear beyond: 95 % efficient with normal errors and resistant to moderate outliers.',
  tukey: 'redescending: residuals beyond 4.685σ get no weight at all, so gross blunders drop out; 95 % efficient with normal errors.',
};
const MODEL_REASONS: Record<ModelId, string> = {
  ellipsoid: 'a and f fitted directly to the arcs with exact meridian distances: no degree-length approximation, hence no model error.',
  degree: 'the classic degree-length line y = c + m·sin²φ; its figure is read from (c, m) by the second-order inversion and carries the model error stated below.',
  degree2: 'the degree-length form with the sin⁴φ term, y = c + m·sin²φ + k·sin⁴φ; model error of order e⁶.',
};

const num = (v: number | null | undefined, digits: number): string => (v === null || v === undefined || !Number.isFinite(v) ? '—' : v.toFixed(digits));
const signed = (v: number | null | undefined, digits: number): string => {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  const text = Math.abs(v).toFixed(digits);
  return Number(text) === 0 ? text : `${v > 0 ? '+' : '−'}${text}`;
};
const plural = (n: number, word: string): string => `${n} ${word}${n === 1 ? '' : 's'}`;
const pValue = (p: number): string => (p < 1e-3 ? p.toExponential(1) : p.toFixed(3));
const pm = (v: number | null | undefined, s: number | null | undefined, digits: number): string => `${num(v, digits)}${s !== null && s !== undefined && Number.isFinite(s) ? ` ± ${num(s, digits)}` : ''}`;

function table(head: readonly string[], rows: readonly (readonly string[])[], cls = ''): string {
  // Cells arrive escaped (or as trusted markup built here); the head is escaped now. No head: a key–value table.
  const thead = head.length > 0 ? `<thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead>` : '';
  return `<table${cls ? ` class="${cls}"` : ''}>${thead}<tbody>${rows.map((r) => `<tr>${r.map((c) => `<td>${c}</td>`).join('')}</tr>`).join('')}</tbody></table>`;
}

const CSS = `
@page { size: A4; margin: 15mm 13mm 16mm 13mm; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; font-size: 10pt; line-height: 1.38; color: #1f2933; margin: 0 auto; max-width: 190mm; padding: 8mm 0; }
h1 { font-size: 17pt; margin: 0 0 2pt; } h2 { font-size: 12.5pt; margin: 16pt 0 5pt; border-bottom: 1.2pt solid #0b7a75; padding-bottom: 2pt; break-after: avoid; }
h3 { font-size: 10.5pt; margin: 10pt 0 3pt; break-after: avoid; }
p { margin: 3pt 0 5pt; } .meta { color: #52606d; font-size: 9pt; }
table { border-collapse: collapse; width: 100%; margin: 4pt 0 8pt; font-size: 8.6pt; font-variant-numeric: tabular-nums; }
th, td { border-bottom: 0.6pt solid #d9dee3; padding: 2pt 4pt; text-align: left; vertical-align: top; }
th { background: #eef2f4; font-weight: 600; } tr { break-inside: avoid; }
td:first-child { white-space: nowrap; } table.summary td:first-child { font-weight: 600; width: 18%; } .figure-box { border: 1pt solid #0b7a75; padding: 6pt 10pt; margin: 6pt 0; break-inside: avoid; }
.figure-box .big { font-size: 13pt; font-weight: 600; } .suspect { color: #c2410c; font-weight: 600; }
figure { margin: 6pt 0 10pt; break-inside: avoid; } figure svg { width: 100%; height: auto; } figcaption { font-size: 8.6pt; color: #52606d; }
.notice { border: 1pt solid #1f2933; padding: 6pt 10pt; margin-top: 10pt; break-inside: avoid; }
ul { margin: 3pt 0 6pt 14pt; padding: 0; } li { margin: 1pt 0; }
.appendix table { font-size: 7.8pt; }
@media print { body { padding: 0; max-width: none; } a { color: inherit; text-decoration: none; } }
`;

function figureLines(fig: Figure | null): string {
  if (!fig) return '<p>No figure: see the status above.</p>';
  return `<div class="figure-box"><div class="big">a = ${pm(fig.semiMajorAxisM, fig.semiMajorAxisStdM, 1)} m &nbsp; · &nbsp; 1/f = ${pm(fig.inverseFlattening, fig.inverseFlatteningStd, 3)}</div>
<div>quadrant (equator to pole) = ${pm(fig.quadrantM, fig.quadrantStdM, 1)} m · e² = ${num(fig.eccentricitySquared, 8)}</div>
<div class="meta">${esc(fig.inversion)}</div></div>`;
}

function uncertaintyTable(d: ReportData): string {
  const own = d.estimators.find((e) => e.estimator === d.result.estimator);
  const b = own?.bootstrap;
  const g = d.correlated.figure;
  const row = (name: string, unit: string, digits: number, est: number | undefined, analytic: number | null | undefined, boot: BootstrapSummary | null | undefined, gls: number | null | undefined): string[] =>
    [esc(name), num(est, digits), num(analytic, digits), num(boot?.standardError, digits), boot ? `${num(boot.lower95, digits)} … ${num(boot.upper95, digits)}` : '—', num(gls, digits), esc(unit)];
  const f = d.result.figure;
  return table(['quantity', 'estimate', 'σ delta method', 'σ bootstrap', 'bootstrap 95 % interval', 'σ full arc covariance', 'unit'], [
    row('a', 'm', 1, f?.semiMajorAxisM, f?.semiMajorAxisStdM, b?.semiMajorAxisM, g?.semiMajorAxisStdM),
    row('1/f', '', 3, f?.inverseFlattening, f?.inverseFlatteningStd, b?.inverseFlattening, g?.inverseFlatteningStd),
    row('quadrant', 'm', 1, f?.quadrantM, f?.quadrantStdM, b?.quadrantM, g?.quadrantStdM),
  ]);
}

function estimatorTable(d: ReportData): string {
  return table(['estimator', 'a (m)', 'σ a (m)', 'σ a boot.', '1/f', 'σ 1/f', 'σ 1/f boot.', 'quadrant (m)', 'suspects', 'converged'],
    d.estimators.map(({ estimator, result, bootstrap }) => {
      const f = result.figure;
      const suspects = result.readings.filter((r) => r.suspect && r.kind === 'arc').length;
      return [
        `${estimator === d.result.estimator ? '<strong>' : ''}${esc(ESTIMATOR_NAMES[estimator])}${estimator === d.result.estimator ? '</strong>' : ''}`,
        num(f?.semiMajorAxisM, 1), num(f?.semiMajorAxisStdM, 1), num(bootstrap.semiMajorAxisM?.standardError, 1),
        num(f?.inverseFlattening, 3), num(f?.inverseFlatteningStd, 3), num(bootstrap.inverseFlattening?.standardError, 3),
        num(f?.quadrantM, 1), String(suspects), result.converged ? 'yes' : `<span class="suspect">no</span>`,
      ];
    }));
}

function flaggedSection(d: ReportData): string {
  const exclusions = new Map((d.file.exclusions ?? []).map((e) => [e.readingId, e]));
  const flagged = d.result.readings.filter((r) => r.suspect || r.excluded);
  if (flagged.length === 0) return '<p>No reading is flagged and none is excluded.</p>';
  return table(['reading', 'kind', 'station / arc', 'residual', 'std. residual', 'flag and hint', 'what was done'], flagged.map((r) => {
    const ex = exclusions.get(r.id);
    const done = ex ? `excluded by ${esc(ex.excludedBy)} at ${esc(ex.at)}: ${esc(ex.reason)}` : 'kept in the fit: flagged, awaiting a decision';
    return [esc(r.id), esc(r.kind), esc(r.station ?? ''), `${num(r.residual, 3)} ${esc(r.residualUnit)}`, signed(r.standardizedResidual, 1) + 'σ',
      `${r.suspect ? '<span class="suspect">suspect</span> ' : ''}${esc(r.hint)}`, done];
  }));
}

function reliabilitySection(d: ReportData): string {
  const arcs = d.reliability.readings.filter((r) => r.kind === 'arc');
  const lat = d.reliability.readings.filter((r) => r.kind === 'latitude' && r.inFit);
  const top = [...lat].sort((x, y) => Math.abs(y.influence?.inverseFlattening ?? 0) - Math.abs(x.influence?.inverseFlattening ?? 0)).slice(0, 10);
  const mdb = (r: (typeof arcs)[number], digits: number): string => (r.minimalDetectableBias === null ? 'unchecked' : num(r.minimalDetectableBias, digits));
  const arcRows = arcs.map((r) => [esc(r.id), esc(r.label), num(r.redundancy, 3), num(r.leverage, 3), mdb(r, 2), num(r.wTest, 2), signed(r.influence?.inverseFlattening, 3), signed(r.influence?.semiMajorAxisM, 1)]);
  const latRows = top.map((r) => [esc(r.id), esc(r.label), num(r.redundancy, 3), num(r.leverage, 3), mdb(r, 3), num(r.minimalDetectableBiasM, 1), signed(r.influence?.inverseFlattening, 3), signed(r.influence?.semiMajorAxisM, 1)]);
  // In words: the weakest arcs (largest MDB) and any arc no other reading checks.
  const weakest = arcs.filter((r) => r.inFit).sort((x, y) => (y.minimalDetectableBias ?? Infinity) - (x.minimalDetectableBias ?? Infinity)).slice(0, 3);
  return `<p>Redundancy, leverage, Baarda's w and the minimal detectable bias (MDB, the smallest blunder the w-test finds with power 80 % at α = 0.001) come from least squares of the arcs with their full covariance and the stated sigmas; a latitude reading is checked by the other repeats at its station. The influence is the change of the ${esc(ESTIMATOR_NAMES[d.result.estimator])} figure when the reading is left out and the campaign solved again.</p>
<ul>${weakest.map((r) => `<li>${esc(r.statement)}</li>`).join('')}</ul>
<h3>Arcs</h3>${table(['reading', 'arc', 'redundancy', 'leverage', 'MDB (m)', 'w', 'Δ 1/f if left out', 'Δ a (m) if left out'], arcRows)}
<h3>Latitude readings with the most influence on 1/f</h3>${table(['reading', 'station', 'redundancy', 'leverage', 'MDB (″)', 'MDB on the ground (m)', 'Δ 1/f if left out', 'Δ a (m) if left out'], latRows)}`;
}

function planSection(d: ReportData): string {
  const plan = d.plan;
  const rows = plan.candidates.slice(0, 12).map((c, i) => [String(i + 1), esc(c.label), num(c.inverseFlatteningStd, 4), num(c.inverseFlatteningGain, 4), num(c.semiMajorAxisStdM, 2)]);
  const now = plan.current ? `Now: σ(1/f) = ${num(plan.current.inverseFlatteningStd, 4)}, σ(a) = ${num(plan.current.semiMajorAxisStdM, 2)} m (a-priori).` : 'The campaign cannot determine a figure yet.';
  const suff = d.sufficiency.map((s) => [esc(s.code), esc(s.kind), String(s.readingCount), num(s.standardErrorArcsec, 3), num(s.targetSigmaArcsec, 3), s.meetsTarget ? 'yes' : 'no', s.moreRepeats === null ? '—' : String(s.moreRepeats)]);
  return `<p>${esc(now)}</p>${table(['rank', 'candidate', 'σ(1/f) after', 'gain', 'σ(a) after (m)'], rows)}
<ul>${plan.assumptions.text.map((t) => `<li>${esc(t)}</li>`).join('')}</ul>
<h3>Station sufficiency (σ/√n rule; systematic errors do not average down)</h3>${table(['station', 'kind', 'repeats', 'σ now (″)', 'target (″)', 'met', 'more needed'], suff)}`;
}

function comparisonSection(d: ReportData): string {
  if (d.comparison.length === 0) return '<p>No figure to compare.</p>';
  const basis = d.correlated.figure ? 'least squares of the arcs with their full covariance' : 'the campaign\'s figure';
  return `<p>Basis: ${esc(basis)} (a = ${num(d.correlated.figure?.semiMajorAxisM ?? d.result.figure?.semiMajorAxisM, 1)} m, 1/f = ${num(d.correlated.figure?.inverseFlattening ?? d.result.figure?.inverseFlattening, 3)}). Differences are campaign minus reference; z is the difference in standard errors; the joint test uses both with their correlation (χ² on 2 degrees of freedom).</p>
${table(['ellipsoid', 'a (m)', '1/f', 'Δa (m)', 'z a', 'Δ 1/f', 'z 1/f', 'joint p', 'distinguishable at 5 %'], d.comparison.map((c) => [
    esc(c.name), num(c.semiMajorAxisM, 3), num(c.inverseFlattening, 6), signed(c.deltaSemiMajorAxisM, 1), signed(c.semiMajorAxisZ, 2), signed(c.deltaInverseFlattening, 3), signed(c.inverseFlatteningZ, 2),
    c.jointPValue === null ? '—' : c.jointPValue < 1e-4 ? c.jointPValue.toExponential(1) : c.jointPValue.toFixed(4), c.distinguishable === null ? '—' : c.distinguishable ? 'yes' : 'no']))}`;
}

function dataTables(d: ReportData): string {
  const f = d.file;
  const stations = table(['code', 'name', 'height (m)', 'longitude (°)', 'notes'], f.stations.map((s) => [esc(s.code), esc(s.name ?? ''), num(s.heightM, 1), num(s.longitudeDeg, 6), esc(s.notes ?? '')]));
  const arcs = table(['id', 'from', 'to', 'distance (m)', 'σ (m)', 'mean height (m)', 'observed'], f.arcReadings.map((a) => [esc(a.id), esc(a.fromStation), esc(a.toStation), num(a.distanceM, 3), num(a.sigmaM, 3), num(a.meanHeightM, 1), esc(a.observedAt ?? '')]));
  const lat = table(['id', 'station', 'kind', 'latitude (°)', 'σ (″)', 'observed', 'observer / method'], f.latitudeReadings.map((r) => [esc(r.id), esc(r.station), esc(r.kind), num(r.latitudeDeg, 8), num(r.sigmaArcsec, 3), esc(r.observedAt), esc([r.observer, r.method].filter(Boolean).join(' · '))]));
  const summaries = table(['station', 'kind', 'latitude (°)', 'σ (″)', 'repeats', 'spread (″)', 'ξ = Φ − φ (″)'], d.result.stations.map((s) => [esc(s.code), esc(s.kind), num(s.latitudeDeg, 8), num(s.sigmaArcsec, 3), String(s.readingCount), num(s.spreadArcsec, 3), num(s.deflectionNorthArcsec, 2)]));
  return `<h3>Station latitudes (reduced)</h3>${summaries}<h3>Stations</h3>${stations}<h3>Arc readings</h3>${arcs}<h3>Latitude readings</h3>${lat}`;
}

function summarySection(d: ReportData, r: CampaignResult): string {
  const f = d.file;
  const lats = r.stations.filter((s) => s.usedInFit !== false && s.readingCount > 0).map((s) => s.latitudeDeg);
  const span = lats.length > 0 ? `${num(Math.min(...lats), 3)}° to ${num(Math.max(...lats), 3)}°` : '—';
  const arcsIn = r.readings.filter((x) => x.kind === 'arc' && x.usedInFit !== false && !x.excluded).length;
  const chosen = (key: 'model' | 'estimator'): string => (f.settings?.[key] ? 'chosen in the campaign settings' : 'the default');
  return table([], [
    ['stations', `${f.stations.length} (latitude span ${span})`],
    ['readings', `${plural(f.latitudeReadings.length, 'latitude reading')}, ${plural(f.arcReadings.length, 'arc reading')} (${arcsIn} in the fit), ${plural((f.exclusions ?? []).length, 'exclusion')}`],
    ['model', `<strong>${esc(r.model)}</strong> (${esc(chosen('model'))}): ${esc(MODEL_REASONS[r.model])}`],
    ['estimator', `<strong>${esc(ESTIMATOR_NAMES[r.estimator])}</strong> (${esc(chosen('estimator'))}): ${esc(ESTIMATOR_REASONS[r.estimator])}`],
    ['weighting', r.weighting === 'propagated' ? 'propagated: each arc weighted by its distance sigma and its stations\' latitude sigmas' : 'equal: every arc the same weight'],
    ['status', `${esc(r.status)}${r.statusMessage ? ` — ${esc(r.statusMessage)}` : ''}`],
    ['fit quality', `RMS ${num(r.quality.rms, 3)} ${esc(r.quality.unit)}, max |residual| ${num(r.quality.maxAbsResidual, 3)} ${esc(r.quality.unit)}${r.quality.chiSquare ? `, χ² = ${num(r.quality.chiSquare.statistic, 2)} on ${r.quality.chiSquare.degreesOfFreedom} degrees of freedom (p = ${pValue(r.quality.chiSquare.pValue)}, ${r.quality.chiSquare.passes ? 'passes' : 'fails'})` : ''}`],
    ['solver', `${esc(r.reason)} (${r.iterations} iterations, ${r.converged ? 'converged' : '<span class="suspect">did not converge</span>'})`],
  ], 'summary');
}

/** The whole report as one HTML document. */
export function campaignReportHtml(d: ReportData): string {
  const r = d.result;
  const own = d.estimators.find((e) => e.estimator === r.estimator)?.bootstrap;
  const modelError = r.modelError
    ? esc(r.modelError.statement)
    : `The rigorous model fits the arcs with exact meridian distances (series sub-millimetre against GeographicLib): no model error.${d.linearModelError ? ` For comparison, the classic line y = c + m·sin²φ would miss exact arcs at these latitudes by up to ${num(d.linearModelError.maxMetresPerDegree, 3)} m per degree.` : ''}`;
  const gls = d.correlated;
  const glsText = gls.figure
    ? `Least squares of the arcs with their full covariance (consecutive arcs share a station, so its latitude error enters both with opposite signs): a = ${pm(gls.figure.semiMajorAxisM, gls.figure.semiMajorAxisStdM, 1)} m, 1/f = ${pm(gls.figure.inverseFlattening, gls.figure.inverseFlatteningStd, 3)}, variance factor ${num(gls.varianceFactor, 2)} on ${gls.degreesOfFreedom} degrees of freedom.`
    : `Least squares with the full arc covariance: ${esc(gls.reason)}.`;
  return `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(`Campaign report — ${d.file.name}`)}</title><style>${CSS}</style></head>
<body>
<header><h1>${esc(d.file.name)}</h1>
<p class="meta">Campaign report · generated ${esc(d.generatedAt)} · arcfield engine ${esc(r.engineVersion)} · bootstrap seed ${d.seed}, ${d.replicates} replicates per estimator</p>
${d.file.description ? `<p>${esc(d.file.description)}</p>` : ''}</header>
<h2>Job summary</h2>${summarySection(d, r)}
<h2>The figure</h2>${figureLines(r.figure)}
<p>${glsText}</p>
${uncertaintyTable(d)}
<p class="meta">${esc(own?.note ?? '')}. σ delta method: from the fit's covariance, carried to a, 1/f and the quadrant by the delta method (none for least absolute deviations and minimax).</p>
<h3>Model error</h3><p>${modelError}</p>
<h2>The five estimators side by side</h2>${estimatorTable(d)}
<h2>Against the reference ellipsoids</h2>${comparisonSection(d)}
<h2>Charts</h2>
<figure>${degreeLengthChart(d.chart.degreePoints, d.chart.curve, 'fitted figure, 95 % band (full arc covariance)')}<figcaption>Degree length s/|Δφ| of each arc at its mid latitude (±1σ) against sin²φ, with the degree length M(φ)·π/180 of the fitted figure and its 95 % band; below, each arc as its departure from the fitted mean degree length over the same arc, where the bars and the band can be seen.</figcaption></figure>
<figure>${arcResidualChart(d.chart.arcResiduals, r.suspectThreshold)}<figcaption>Standardized residuals of the arcs in latitude order; beyond the dashed lines (±${num(r.suspectThreshold, 1)}σ) an arc is suspect.</figcaption></figure>
<figure>${latitudeRepeatsChart(d.chart.repeats)}<figcaption>Latitude repeats per station: each reading minus its station's estimate (″); suspect readings in orange, excluded ones hollow.</figcaption></figure>
<h2>Flagged and excluded readings</h2>${flaggedSection(d)}
<h2>Reliability of the readings</h2>${reliabilitySection(d)}
<h2>Where to observe next</h2>${planSection(d)}
<h2>Field cautions</h2><ul>${FIELD_CAUTIONS.map((c) => `<li>${escapeWithStrong(c)}</li>`).join('')}</ul>
<div class="notice"><strong>Not a legal survey.</strong> ${escapeWithStrong(LEGAL_NOTICE)}</div>
<section class="appendix"><h2>Data</h2>${dataTables(d)}</section>
</body></html>
`;
}
