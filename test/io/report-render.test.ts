// The campaign report rendered in headless Chromium (Debian /usr/bin/chromium through
// playwright-core): saved as PDF and as a PNG of page one in test/artifacts/ (gitignored), the key
// numbers present in the rendered text, nothing fetched from outside the document.
import { mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser } from 'playwright-core';
import { demoCampaign } from '../../src/campaign/demo.ts';
import { buildReportData, type ReportData } from '../../src/io/report-data.ts';
import { campaignReportHtml } from '../../src/io/report-html.ts';

const ARTIFACTS = fileURLToPath(new URL('../artifacts/', import.meta.url));
const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-quic', '--no-first-run'];

let browser: Browser;
let data: ReportData;
let html: string;

beforeAll(async () => {
  mkdirSync(ARTIFACTS, { recursive: true });
  // Few replicates keep the test short; the CLI default is 1000.
  data = buildReportData(demoCampaign(), { generatedAt: '2026-07-01T12:00:00Z', replicates: 60, seed: 7 });
  html = campaignReportHtml(data);
  writeFileSync(`${ARTIFACTS}report.html`, html);
  browser = await chromium.launch({ executablePath: '/usr/bin/chromium', headless: true, args: CHROMIUM_ARGS });
}, 120_000);

afterAll(async () => {
  await browser?.close();
});

describe('campaign report in Chromium', () => {
  it('is self-contained: no script, no external reference', () => {
    expect(html).not.toMatch(/<script|<link|<img|<iframe|\bsrc=|\bhref=|url\(/i);
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
  });

  it('renders, prints to PDF and shows the key numbers; fetches nothing', async () => {
    const page = await browser.newPage({ viewport: { width: 794, height: 1123 } });
    const requests: string[] = [];
    page.on('request', (r) => requests.push(r.url()));
    await page.setContent(html, { waitUntil: 'load' });
    const text = await page.innerText('body');
    const fig = data.result.figure;
    expect(fig).not.toBeNull();
    if (!fig) return;
    expect(text).toContain(`a = ${fig.semiMajorAxisM.toFixed(1)} ± ${fig.semiMajorAxisStdM?.toFixed(1)} m`);
    expect(text).toContain(`1/f = ${fig.inverseFlattening.toFixed(3)} ± ${fig.inverseFlatteningStd?.toFixed(3)}`);
    expect(text).toContain(fig.quadrantM.toFixed(1));
    for (const name of ['WGS 84', 'GRS 80', 'International 1924 (Hayford)', 'Clarke 1866', 'Airy 1830']) expect(text).toContain(name);
    for (const e of ['least squares', 'least absolute deviations', 'minimax (Chebyshev)', 'Huber (k = 1.345)', 'Tukey biweight (c = 4.685)']) expect(text).toContain(e);
    // The planted blunders of the demo are listed with what was done about them; the crew's exclusion with who and why.
    for (const id of ['r-K04-3', 'r-K09-5', 'a-K06-K07']) expect(text).toContain(id);
    const ex = demoCampaign().exclusions?.[0];
    expect(text).toContain(`excluded by ${ex?.excludedBy}`);
    expect(text).toContain('kept in the fit: flagged, awaiting a decision');
    expect(text).toContain(`new station at`);
    expect(text).toMatch(/a blunder under [\d.]+ m on arc K\d\d–K\d\d would go unnoticed/);
    expect(text).toContain('not a legal or cadastral survey');
    expect(text).toContain('Never point an optical instrument');
    expect(await page.locator('svg').count()).toBe(3);
    expect(requests.filter((u) => !u.startsWith('about:') && !u.startsWith('data:'))).toEqual([]);

    await page.screenshot({ path: `${ARTIFACTS}report-page1.png`, clip: { x: 0, y: 0, width: 794, height: 1123 } });
    const pdf = await page.pdf({ path: `${ARTIFACTS}report.pdf`, format: 'A4', printBackground: true, preferCSSPageSize: true });
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
    console.log(`report: ${Math.round(html.length / 1024)} KiB HTML, ${pages} PDF pages, ${Math.round(pdf.length / 1024)} KiB PDF`);
    expect(pages).toBeGreaterThan(2);
    await page.close();
  });
});
