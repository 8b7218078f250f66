// The performance targets of issue 5, as ratios within one run on the same data. A speed target
// passes only when the fit it times is also exact (a fast wrong answer is not a pass). The bench
// reports; it never fails the test suite.
import type { Estimator } from '../../src/fit/types.ts';
import { formatRatio, formatSeconds, formatSize } from './format-units.ts';
import type { BenchReport, TargetLine } from './report-types.ts';

export const TARGET_N = 1_000_000;
export const WARM_N = 10_000;
const L1_SPEEDUP = 10;
const L1_FLOOR = 30;
const MINIMAX_SPEEDUP = 100;
const M_SPEEDUP_VS_MASS = 5;
const LS_WITHIN_NUMPY = 2;
const MEMORY_RATIO = 4;
const WARM_RATIO = 1 / 20;

type Part = Pick<BenchReport, 'results' | 'ours' | 'peers' | 'memory' | 'warmRefit' | 'settings'>;

function targetSize(report: Part): { n: number; note: string } {
  const sizes = report.settings.sizes;
  if (sizes.includes(TARGET_N)) return { n: TARGET_N, note: '' };
  const n = Math.max(...sizes);
  return { n, note: ` [measured at n = ${formatSize(n)}; the target is stated at n = ${formatSize(TARGET_N)}]` };
}

function speedTarget(report: Part, estimator: Estimator, p: number, n: number, note: string, label: string, min: number): TargetLine {
  const row = report.results.find((r) => r.estimator === estimator && r.p === p && r.n === n);
  const name = `${label} p = ${p}: ≥ ${min}× faster than the fastest peer`;
  if (!row || row.speedup === null || row.oursSeconds === null) return { name, pass: null, detail: `no figure (${row?.oursStatus ?? 'not run'})${note}` };
  const pass = row.speedup >= min && row.exactMatch === true;
  return { name, pass, detail: `${formatRatio(row.speedup)} vs ${row.fastestPeer} (ours ${formatSeconds(row.oursSeconds)}, theirs ${formatSeconds(row.fastestPeerSeconds)}), exact: ${row.exactMatch === true ? 'yes' : row.exactMatch === false ? 'NO' : 'unchecked'}${note}` };
}

function vsPeerTarget(report: Part, estimator: Estimator, p: number, n: number, note: string, peerId: string, name: string, test: (ours: number, theirs: number) => boolean, describe: (ours: number, theirs: number) => string): TargetLine {
  const row = report.results.find((r) => r.estimator === estimator && r.p === p && r.n === n);
  const peer = report.peers.find((r) => r.id === peerId && r.p === p && r.n === n);
  if (!row || row.oursSeconds === null) return { name, pass: null, detail: `no figure for ours (${row?.oursStatus ?? 'not run'})${note}` };
  if (!peer || peer.status !== 'ok' || peer.medianSeconds === null) return { name, pass: null, detail: `no figure for ${peerId} (${peer?.note ?? 'not run'})${note}` };
  const pass = test(row.oursSeconds, peer.medianSeconds) && row.exactMatch === true;
  return { name, pass, detail: `${describe(row.oursSeconds, peer.medianSeconds)} (ours ${formatSeconds(row.oursSeconds)}, ${peer.label} ${formatSeconds(peer.medianSeconds)}), exact: ${row.exactMatch === true ? 'yes' : row.exactMatch === false ? 'NO' : 'unchecked'}${note}` };
}

export function evaluateTargets(report: Part, estimators: readonly Estimator[]): TargetLine[] {
  const { n, note } = targetSize(report);
  const lines: TargetLine[] = [];
  for (const p of [2, 3]) {
    lines.push(speedTarget(report, 'least-absolute', p, n, note, 'exact L1', L1_SPEEDUP));
    const row = report.results.find((r) => r.estimator === 'least-absolute' && r.p === p && r.n === n);
    const name = `exact L1 p = ${p}: within ${L1_FLOOR}× of the one-pass floor`;
    lines.push(row?.oursOverFloor != null
      ? { name, pass: row.oursOverFloor <= L1_FLOOR, detail: `${formatRatio(row.oursOverFloor)} the floor (ours ${formatSeconds(row.oursSeconds)}, floor ${formatSeconds(row.floorSeconds)})${note}` }
      : { name, pass: null, detail: `no figure${note}` });
  }
  for (const p of [2, 3]) lines.push(speedTarget(report, 'minimax', p, n, note, 'exact minimax', MINIMAX_SPEEDUP));
  for (const [est, peerId] of [['huber', 'mass-rlm-huber'], ['tukey', 'mass-rlm-bisquare']] as const) {
    for (const p of [2, 3]) {
      lines.push(vsPeerTarget(report, est, p, n, note, peerId, `${est} p = ${p}: ≥ ${M_SPEEDUP_VS_MASS}× faster than MASS::rlm`,
        (o, t) => t / o >= M_SPEEDUP_VS_MASS, (o, t) => `${formatRatio(t / o)}`));
    }
  }
  for (const p of [2, 3]) {
    lines.push(vsPeerTarget(report, 'least-squares', p, n, note, 'numpy-lstsq', `least squares p = ${p}: within ${LS_WITHIN_NUMPY}× of numpy lstsq`,
      (o, t) => o <= LS_WITHIN_NUMPY * t, (o, t) => `${formatRatio(o / t)} numpy's time`));
  }
  for (const est of estimators) {
    const rows = report.memory.filter((m) => m.estimator === est && m.n === n);
    const name = `${est}: peak memory at n = ${formatSize(TARGET_N)} under ${MEMORY_RATIO}× the input bytes above idle`;
    if (rows.length === 0) { lines.push({ name, pass: null, detail: `no figure${note}` }); continue; }
    const worst = rows.reduce((a, b) => (b.ratioToInput > a.ratioToInput ? b : a));
    lines.push({ name, pass: rows.every((r) => r.ratioToInput < MEMORY_RATIO), detail: `worst ${worst.ratioToInput.toFixed(2)}× at p = ${worst.p} (${(worst.peakAboveIdleBytes / 2 ** 20).toFixed(1)} MiB above idle for ${(worst.inputBytes / 2 ** 20).toFixed(1)} MiB of input)${note}` });
  }
  for (const est of estimators) {
    const rows = report.warmRefit.filter((w) => w.estimator === est && w.n === WARM_N);
    const name = `${est}: warm refit after one more reading at n = ${formatSize(WARM_N)} under 1/20 of a cold fit`;
    const errors = report.ours.filter((o) => o.estimator === est && o.n === WARM_N && o.warmRefitError).map((o) => `p = ${o.p}: ${o.warmRefitError}`);
    if (errors.length > 0) { lines.push({ name, pass: false, detail: `warm refit threw (${errors.join('; ')})` }); continue; }
    if (rows.length === 0) { lines.push({ name, pass: null, detail: 'no figure' }); continue; }
    const worst = rows.reduce((a, b) => (b.ratio > a.ratio ? b : a));
    lines.push({ name, pass: rows.every((r) => r.ratio < WARM_RATIO && r.sameResult), detail: `worst 1/${(1 / worst.ratio).toFixed(1)} at p = ${worst.p} (warm ${formatSeconds(worst.warmSeconds)}, cold ${formatSeconds(worst.coldSeconds)}), same answer: ${rows.every((r) => r.sameResult) ? 'yes' : 'NO'}` });
  }
  return lines;
}
