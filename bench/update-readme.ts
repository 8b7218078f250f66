// Regenerates the README's benchmark section from a results file (default bench/results/latest.json):
//   npx tsx bench/update-readme.ts [results.json]
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputError } from '../src/errors.ts';
import { updateReadme } from './harness/readme-section.ts';
import type { BenchReport } from './harness/report-types.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const path = process.argv[2] ?? join(root, 'bench', 'results', 'latest.json');
const report = JSON.parse(readFileSync(path, 'utf8')) as BenchReport;
if (report.format !== 'arcfield-bench-results' || report.version !== 1) {
  throw new InputError('results file', path, 'is not an arcfield-bench-results version 1 file');
}
updateReadme(report, join(root, 'README.md'));
process.stdout.write(`README.md benchmark section regenerated from ${path}\n`);
