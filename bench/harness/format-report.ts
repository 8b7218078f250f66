// The tables a person reads: plain text on stdout, Markdown for the README. Both come from the
// same rows of bench/results/latest.json.
import { formatGap, formatRatio, formatSeconds, formatSize } from './format-units.ts';
import type { BenchReport, PeerRun, ResultRow } from './report-types.ts';

type Table = { headers: string[]; rows: string[][]; align?: ('l' | 'r')[] };

export function textTable({ headers, rows, align }: Table): string {
  const widths = headers.map((h, j) => Math.max(h.length, ...rows.map((r) => (r[j] ?? '').length)));
  const cell = (s: string, j: number): string => ((align?.[j] ?? 'l') === 'r' ? s.padStart(widths[j]) : s.padEnd(widths[j]));
  const line = (r: string[]): string => r.map(cell).join('  ').trimEnd();
  return [line(headers), widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}

export function markdownTable({ headers, rows, align }: Table): string {
  const esc = (s: string): string => s.replace(/\|/g, '\\|');
  return [
    `| ${headers.map(esc).join(' | ')} |`,
    `|${headers.map((_, j) => ((align?.[j] ?? 'l') === 'r' ? '---:' : '---')).join('|')}|`,
    ...rows.map((r) => `| ${r.map(esc).join(' | ')} |`),
  ].join('\n');
}

function exactCell(r: ResultRow): string {
  if (r.exactMatch === null) return r.oursSeconds === null ? '—' : 'unchecked';
  return `${r.exactMatch ? 'yes' : 'NO'} (${formatGap(r.exactness.relativeDifference)})`;
}

export function resultsTable(report: Pick<BenchReport, 'results'>): Table {
  return {
    headers: ['estimator', 'p', 'n', 'ours', 'floor', 'ours/floor', 'fastest peer', 'peer', 'speed-up', 'exact (rel. diff)'],
    align: ['l', 'r', 'r', 'r', 'r', 'r', 'l', 'r', 'r', 'l'],
    rows: report.results.map((r) => [
      r.estimator, String(r.p), formatSize(r.n),
      r.oursSeconds === null ? 'n/a' : formatSeconds(r.oursSeconds),
      formatSeconds(r.floorSeconds), formatRatio(r.oursOverFloor),
      r.fastestPeer ?? '—', formatSeconds(r.fastestPeerSeconds), formatRatio(r.speedup), exactCell(r),
    ]),
  };
}

const SHORT: Record<PeerRun['status'], string> = { ok: '', missing: 'missing', skipped: 'skipped', 'timed out': 'timed out', failed: 'failed' };

export function peersTable(report: Pick<BenchReport, 'peers' | 'settings'>): { table: Table; notes: string[] } {
  const sizes = report.settings.sizes;
  const keys: string[] = [];
  const byKey = new Map<string, PeerRun[]>();
  for (const r of report.peers) {
    const k = `${r.estimator}\u0000${r.label}\u0000${r.p}`;
    if (!byKey.has(k)) { byKey.set(k, []); keys.push(k); }
    byKey.get(k)?.push(r);
  }
  const notes = new Set<string>();
  const rows = keys.map((k) => {
    const runs = byKey.get(k) ?? [];
    const [estimator, label, p] = k.split('\u0000');
    const role = runs[0]?.role === 'check' ? ' (check)' : '';
    return [estimator, label + role, p, ...sizes.map((n) => {
      const r = runs.find((x) => x.n === n);
      if (!r) return '';
      if (r.status === 'ok') return formatSeconds(r.medianSeconds) + (r.converged === false ? ' (not conv.)' : '');
      notes.add(`${estimator}, ${label}, p = ${p}, n = ${formatSize(n)}: ${r.note}`);
      return SHORT[r.status];
    })];
  });
  return {
    table: { headers: ['estimator', 'peer', 'p', ...sizes.map(formatSize)], align: ['l', 'l', 'r', ...sizes.map(() => 'r' as const)], rows },
    notes: [...notes],
  };
}

export function memoryTable(report: Pick<BenchReport, 'memory'>): Table {
  const mib = (b: number): string => (b / 2 ** 20).toFixed(1);
  return {
    headers: ['estimator', 'p', 'n', 'input MiB', 'peak above idle MiB', '× input', 'fit working MiB', 'retained MiB'],
    align: ['l', 'r', 'r', 'r', 'r', 'r', 'r', 'r'],
    rows: report.memory.map((m) => [m.estimator, String(m.p), formatSize(m.n), mib(m.inputBytes), mib(m.peakAboveIdleBytes), m.ratioToInput.toFixed(2), mib(m.peakAboveLoadedBytes), mib(m.retainedAfterFitBytes)]),
  };
}

export function warmTable(report: Pick<BenchReport, 'warmRefit'>): Table {
  return {
    headers: ['estimator', 'p', 'n', 'cold', 'warm (median)', 'warm max', 'warm/cold', 'same answer', 'iterations warm/cold', 'refits with no iteration', 'rollback'],
    align: ['l', 'r', 'r', 'r', 'r', 'r', 'r', 'l', 'r', 'r', 'r'],
    rows: report.warmRefit.map((w) => [w.estimator, String(w.p), formatSize(w.n), formatSeconds(w.coldSeconds), formatSeconds(w.warmSeconds),
      w.warmSecondsMax === undefined ? '–' : formatSeconds(w.warmSecondsMax),
      `1/${(1 / w.ratio).toFixed(1)}`, `${w.sameResult ? 'yes' : 'NO'} (${formatGap(w.relativeDifference)})`, `${w.warmIterations}/${w.coldIterations}`,
      w.cases === undefined ? '–' : `${w.fastPathCases ?? 0}/${w.cases}`, w.rollbackSeconds === undefined ? '–' : formatSeconds(w.rollbackSeconds)]),
  };
}

export function targetLines(report: Pick<BenchReport, 'targets'>): string[] {
  return report.targets.map((t) => `${t.pass === null ? 'N/A ' : t.pass ? 'PASS' : 'FAIL'}  ${t.name} — ${t.detail}`);
}

export function machineLine(report: Pick<BenchReport, 'machine' | 'startedAt'>): string {
  const m = report.machine;
  const pk = m.packages;
  return `${m.cpuModel}, ${m.cores} cores, ${(m.memoryBytes / 2 ** 30).toFixed(0)} GiB, ${m.os}; Node ${m.node}, R ${m.R ?? 'missing'} ` +
    `(quantreg ${pk.quantreg ?? '—'}, MASS ${pk.MASS ?? '—'}), Python ${m.python ?? 'missing'} (numpy ${pk.numpy ?? '—'}, scipy ${pk.scipy ?? '—'}, ` +
    `statsmodels ${pk.statsmodels ?? '—'}), yalps ${pk.yalps ?? '—'}; load average at start ${m.loadAverageAtStart.join(' ')}; run ${report.startedAt}`;
}

export function textReport(report: BenchReport): string {
  const peers = peersTable(report);
  return [
    `arcfield benchmark — ${machineLine(report)}`,
    '',
    textTable(resultsTable(report)),
    '',
    'Peers (median seconds per fit; checks are correctness references, not racing):',
    textTable(peers.table),
    ...(peers.notes.length ? ['', ...peers.notes.map((n) => `  ${n}`)] : []),
    '',
    'Peak memory (kernel high-water mark of the first fit, per process; below n = 10⁵ the figure is JIT code and heap',
    'growth rather than data, and can be negative when a collection returns pages; the target is read at 10⁶):',
    textTable(memoryTable(report)),
    '',
    'Warm refit after one more reading:',
    textTable(warmTable(report)),
    '',
    'Targets:',
    ...targetLines(report),
  ].join('\n');
}
