// Field-app benchmark in headless Chromium on the production build (run: npx tsx bench/app-refit.ts
// [--saves N] [--throttle 4]):
//  1. initial JS+CSS transfer size: every .js/.css file the page requested by the time the
//     campaigns screen is visible (Resource Timing), gzip -9 of each file in dist/ (vite preview
//     serves them uncompressed; a production host would gzip or better);
//  2. save → updated estimate on a campaign of 2,000 readings (an invented 40-station meridian
//     campaign, imported through the app's own import action): time from the click on "Save
//     reading" to the live-fit strip showing a solved fit that includes the new reading, measured
//     inside the page (performance.now in a capturing click listener and a MutationObserver), and
//     the part of it spent in solveCampaign in the worker. Optionally under CDP CPU throttling.
// Results go to bench/results/app-refit.json and stdout.
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { CAMPAIGN_FILE_FORMAT, CAMPAIGN_FILE_VERSION, type CampaignFile, type LatitudeReading } from '../src/campaign/records.ts';
import { seededRandom } from '../src/campaign/seeded-random.ts';
import { ellipsoidById, meridianArcM } from '../src/geodesy/index.ts';
import { ensureBuild, launchPhone, ROOT, startPreview } from '../test/e2e/helpers/browser.ts';

const STATIONS = 40;
const READINGS_TOTAL = 2000;
const args = process.argv.slice(2);
const arg = (name: string, dflt: number) => { const i = args.indexOf(name); return i >= 0 ? Number(args[i + 1]) : dflt; };
const SAVES = arg('--saves', 7);
const THROTTLE = arg('--throttle', 1);

/** Invented campaign: 40 stations 5°–64.25° N on one meridian, WGS 84 arcs with seeded noise. */
function bigCampaign(): CampaignFile {
  const rng = seededRandom(31_337);
  const wgs84 = ellipsoidById('wgs84');
  const lat = Array.from({ length: STATIONS }, (_, i) => 5 + i * 1.5 + 0.01 * i * i / 10);
  const codes = lat.map((_, i) => `B${String(i + 1).padStart(2, '0')}`);
  const arcs = STATIONS - 1;
  const perStation = Math.floor((READINGS_TOTAL - arcs) / STATIONS);
  let extra = READINGS_TOTAL - arcs - perStation * STATIONS;
  const latitudeReadings: LatitudeReading[] = [];
  lat.forEach((phi, s) => {
    const n = perStation + (extra-- > 0 ? 1 : 0);
    for (let k = 0; k < n; k++) {
      latitudeReadings.push({
        id: `r-${codes[s]}-${k}`, station: codes[s], kind: 'astronomic', sigmaArcsec: 0.3,
        latitudeDeg: phi + (0.3 * rng.normal()) / 3600,
        observedAt: new Date(Date.UTC(2031, 5, 1) + (s * 100 + k) * 60_000).toISOString(),
      });
    }
  });
  return {
    format: CAMPAIGN_FILE_FORMAT, version: CAMPAIGN_FILE_VERSION, name: 'Bench: 2000 readings (invented)',
    stations: codes.map((code) => ({ code, heightM: 300 })),
    latitudeReadings,
    arcReadings: codes.slice(1).map((to, i) => {
      const d = meridianArcM(wgs84, lat[i], lat[i + 1]);
      return { id: `a-${i}`, fromStation: codes[i], toStation: to, distanceM: d + 0.5 * rng.normal(), sigmaM: 0.5 };
    }),
  };
}

const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2; };

async function main(): Promise<void> {
  ensureBuild();
  const server = await startPreview();
  const browser = await launchPhone({ latitude: 8, longitude: 21.5, accuracy: 5 });
  const { page, context } = browser;
  const top = () => page.locator('.ion-page:not(.ion-page-hidden)').last();
  // tsx compiles functions with esbuild's keep-names helper; functions sent to page.evaluate need it too.
  await page.addInitScript({ content: 'window.__name = (f) => f;' });
  try {
    // 1. Initial transfer: what the first screen loaded.
    await page.goto(server.url);
    await top().locator('[data-testid="create-campaign"]').waitFor();
    const loaded = await page.evaluate(() => performance.getEntriesByType('resource').map((e) => e.name).filter((n) => /\.(js|css)(\?|$)/.test(n)));
    const files = loaded.map((u) => new URL(u).pathname).filter((p) => p.startsWith('/assets/'));
    const sizes = files.map((p) => {
      const raw = readFileSync(join(ROOT, 'dist', p));
      return { file: basename(p), rawBytes: raw.length, gzipBytes: gzipSync(raw, { level: 9 }).length };
    });
    const initial = { files: sizes, rawBytes: sizes.reduce((a, s) => a + s.rawBytes, 0), gzipBytes: sizes.reduce((a, s) => a + s.gzipBytes, 0) };

    // 2. Import the 2,000-reading campaign and wait for its first fit.
    const dir = mkdtempSync(join(tmpdir(), 'arcfield-bench-'));
    const file = join(dir, 'bench-2000.json');
    writeFileSync(file, JSON.stringify(bigCampaign()));
    await top().locator('[data-testid="import-file"]').setInputFiles(file);
    await top().locator('[data-testid="campaign-title"]').getByText('Bench').waitFor({ timeout: 120_000 });
    const latCount = READINGS_TOTAL - (STATIONS - 1);
    await top().locator(`[data-testid="fit-strip"][data-phase="solved"][data-latitude-count="${latCount}"]`).waitFor({ timeout: 120_000 });
    const firstSolveMs = Number(await top().locator('[data-testid="fit-strip"]').getAttribute('data-solve-ms'));
    const rawRead = await page.evaluate(() => new Promise<number[]>((resolve, reject) => {
      const req = indexedDB.open('arcfield');
      req.onerror = () => reject(new Error('open failed'));
      req.onsuccess = () => {
        const db = req.result;
        const times: number[] = [];
        const once = (left: number) => {
          const t0 = performance.now();
          const tx = db.transaction(['latitudeReadings', 'arcReadings', 'stations', 'exclusions'], 'readonly');
          let pending = 4;
          for (const t of ['latitudeReadings', 'arcReadings', 'stations', 'exclusions']) {
            const g = tx.objectStore(t).getAll();
            g.onsuccess = () => { if (--pending === 0) { times.push(performance.now() - t0); if (left > 1) once(left - 1); else { db.close(); resolve(times); } } };
          }
        };
        once(5);
      };
    }));
    console.log('raw IndexedDB getAll of the four tables, ms:', rawRead.map((x) => x.toFixed(0)).join(' '));
    if (THROTTLE > 1) {
      const cdp = await context.newCDPSession(page);
      await cdp.send('Emulation.setCPUThrottlingRate', { rate: THROTTLE });
    }
    await top().locator('[data-testid="add-latitude"]').click();
    const sheetPick = async () => {
      await top().locator('[data-testid="latitude-station"]').click();
      await page.locator('ion-action-sheet button').filter({ hasText: /^\s*B01\s*$/ }).first().click();
      await page.locator('ion-action-sheet').waitFor({ state: 'detached' });
    };
    await sheetPick();
    const runs: { saveToEstimateMs: number; savedShownMs: number; readMs: number; solveMs: number; changeToResultMs: number }[] = [];
    for (let i = 0; i < SAVES; i++) {
      const target = latCount + i + 1;
      await top().locator('[data-testid="latitude-text"] input').fill(`5 00 ${(0.1 * (i % 5)).toFixed(2)} N`);
      await top().locator('[data-testid="latitude-sigma"] input').fill('0.3');
      await page.evaluate((want) => {
        const w = window as unknown as { benchT0: number | null; benchT1: number | null; benchSaved: number | null };
        w.benchT0 = null; w.benchT1 = null; w.benchSaved = null;
        // The previous save's "Saved" is still on screen: clear its marker so only the new one counts.
        document.querySelectorAll('[data-testid="save-status"]').forEach((e) => e.removeAttribute('data-phase'));
        const btn = [...document.querySelectorAll('[data-testid="save-latitude"]')].pop();
        btn?.addEventListener('click', () => { w.benchT0 = performance.now(); }, { capture: true, once: true });
        const check = () => {
          if (w.benchSaved === null && w.benchT0 !== null && document.querySelector('[data-testid="save-status"][data-phase="saved"]')) w.benchSaved = performance.now();
          const hit = [...document.querySelectorAll('[data-testid="fit-strip"]')].some((e) => e.getAttribute('data-phase') === 'solved' && e.getAttribute('data-latitude-count') === String(want));
          if (hit && w.benchT1 === null) { w.benchT1 = performance.now(); obs.disconnect(); }
        };
        const obs = new MutationObserver(check);
        obs.observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ['data-phase', 'data-latitude-count'] });
      }, target);
      await top().locator('[data-testid="save-latitude"]').click();
      await page.waitForFunction(() => (window as unknown as { benchT1: number | null }).benchT1 !== null, undefined, { timeout: 120_000 });
      const [t, savedMs] = await page.evaluate(() => { const w = window as unknown as { benchT0: number; benchT1: number; benchSaved: number | null }; return [w.benchT1 - w.benchT0, (w.benchSaved ?? Number.NaN) - w.benchT0]; });
      const strip = top().locator('[data-testid="fit-strip"]');
      const solveMs = Number(await strip.getAttribute('data-solve-ms'));
      const changeToResultMs = Number(await strip.getAttribute('data-change-ms'));
      const readMs = Number(await strip.getAttribute('data-read-ms'));
      runs.push({ saveToEstimateMs: t, savedShownMs: savedMs, readMs, solveMs, changeToResultMs });
    }
    const out = {
      when: new Date().toISOString(),
      browser: 'Debian chromium (headless), phone viewport 390×844',
      cpuThrottle: THROTTLE,
      initialTransfer: initial,
      campaign: { readings: READINGS_TOTAL, latitudeReadings: latCount, arcReadings: STATIONS - 1, stations: STATIONS },
      firstSolveMs,
      saves: runs,
      saveToEstimateMedianMs: median(runs.map((r) => r.saveToEstimateMs)),
      saveToEstimateMaxMs: Math.max(...runs.map((r) => r.saveToEstimateMs)),
      solveMedianMs: median(runs.map((r) => r.solveMs)),
      /** Reading the 2,000 records again after the change (the liveQuery's own query). */
      readMedianMs: median(runs.map((r) => r.readMs)),
      /** From the start of that read to the answer on screen: read + worker round trip. */
      changeToResultMedianMs: median(runs.map((r) => r.changeToResultMs)),
      /** From the click to "Saved" (transaction committed with strict durability and read back). */
      savedShownMedianMs: median(runs.map((r) => r.savedShownMs)),
    };
    mkdirSync(join(ROOT, 'bench/results'), { recursive: true });
    writeFileSync(join(ROOT, `bench/results/app-refit${THROTTLE > 1 ? `-throttle${THROTTLE}` : ''}.json`), JSON.stringify(out, null, 2) + '\n');
    console.log(`initial JS+CSS: ${(initial.gzipBytes / 1024).toFixed(1)} KiB gzip (${(initial.rawBytes / 1024).toFixed(0)} KiB raw, ${sizes.length} files)`);
    console.log(`2,000 readings: first solve ${firstSolveMs.toFixed(0)} ms; save → updated estimate median ${out.saveToEstimateMedianMs.toFixed(0)} ms, max ${out.saveToEstimateMaxMs.toFixed(0)} ms ("Saved" shown after ${out.savedShownMedianMs.toFixed(0)} ms; re-read + worker + answer ${out.changeToResultMedianMs.toFixed(0)} ms, of which re-read ${out.readMedianMs.toFixed(0)} ms, solve ${out.solveMedianMs.toFixed(0)} ms) over ${SAVES} saves, CPU throttle ${THROTTLE}×`);
  } catch (err) {
    mkdirSync(join(ROOT, 'bench/results'), { recursive: true });
    await page.screenshot({ path: join(ROOT, 'bench/results/app-refit-failure.png') });
    const strips = await page.evaluate(() => [...document.querySelectorAll('[data-testid="fit-strip"]')].map((e) => e.outerHTML.slice(0, 400)));
    console.error('fit strips at failure:', strips);
    throw err;
  } finally {
    await browser.close();
    server.stop();
  }
}

await main();
