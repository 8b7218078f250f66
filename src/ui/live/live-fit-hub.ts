// One running fit per open campaign, shared by every screen that shows it (Ionic keeps earlier
// pages mounted, so per-page solving would repeat the work). The hub watches the campaign's change
// log with a Dexie liveQuery and keeps an incremental copy of its records; each change sends one
// solve to the worker (latest wins there), and a result is shown only if it is newer than the one
// on screen.
import { liveQuery, type Subscription } from 'dexie';
import type { CampaignRecords } from '../../campaign/records.ts';
import type { CampaignResult } from '../../campaign/result.ts';
// Store modules by path: the store's index also re-exports the sync store and the imports, which
// the first screen does not need (bench/app-size.ts).
import type { ArcfieldDb } from '../../store/arcfield-db.ts';
import { CampaignMirror, lastChangeSeq } from '../../store/campaign-mirror.ts';
import type { FitChartData, SolveClient } from '../../worker/index.ts';
import { solveOptionsFor, type AppSettings } from '../settings/app-settings.ts';

export interface LiveFit {
  /** 'waiting' before the first answer; 'missing' when the campaign is not on this device. */
  phase: 'waiting' | 'solving' | 'solved' | 'failed' | 'missing';
  result: CampaignResult | null;
  chart: FitChartData | null;
  /** Readings in the records that produced `result`. */
  latitudeReadingCount: number;
  arcReadingCount: number;
  error: string | null;
  solveMs: number | null;
  /** Time to read the campaign's records for this answer, ms. */
  readMs: number | null;
  /** Time from the store change to the answer on screen, ms. */
  changeToResultMs: number | null;
  updatedAtMs: number | null;
}

const INITIAL: LiveFit = {
  phase: 'waiting', result: null, chart: null, latitudeReadingCount: 0, arcReadingCount: 0, error: null,
  solveMs: null, readMs: null, changeToResultMs: null, updatedAtMs: null,
};

interface Entry {
  state: LiveFit;
  listeners: Set<(s: LiveFit) => void>;
  sub: Subscription | null;
  lastRecords: CampaignRecords | null;
  shownRequest: number;
  mirror?: CampaignMirror;
}

export class LiveFitHub {
  private entries = new Map<string, Entry>();

  constructor(private readonly db: ArcfieldDb, private readonly solver: SolveClient, private settings: AppSettings, private readonly now: () => number = () => performance.now()) {}

  current(campaignId: string): LiveFit {
    return this.entries.get(campaignId)?.state ?? INITIAL;
  }

  subscribe(campaignId: string, listener: (s: LiveFit) => void): () => void {
    let entry = this.entries.get(campaignId);
    if (!entry) {
      entry = { state: INITIAL, listeners: new Set(), sub: null, lastRecords: null, shownRequest: 0 };
      this.entries.set(campaignId, entry);
    }
    entry.listeners.add(listener);
    if (!entry.sub) this.watch(campaignId, entry);
    return () => {
      entry.listeners.delete(listener);
      if (entry.listeners.size === 0) {
        entry.sub?.unsubscribe();
        entry.sub = null;
      }
    };
  }

  /** Device defaults changed (estimator, model, threshold): refit every watched campaign. */
  setSettings(settings: AppSettings): void {
    this.settings = settings;
    for (const [id, entry] of this.entries) if (entry.sub && entry.lastRecords) void this.solve(id, entry, entry.lastRecords, this.now());
  }

  private watch(campaignId: string, entry: Entry): void {
    // Observe only the campaign's change-log position (cheap); the mirror then reads just the
    // records that moved (src/store/campaign-mirror.ts) instead of all of them after every save.
    const mirror = entry.mirror ?? new CampaignMirror(this.db, campaignId);
    entry.mirror = mirror;
    entry.sub = liveQuery(() => lastChangeSeq(this.db, campaignId)).subscribe({
      next: () => {
        const changedAt = this.now();
        mirror.refresh().then(({ records, changed }) => {
          if (!records) { this.set(entry, { ...INITIAL, phase: 'missing' }); return; }
          if (!changed && entry.lastRecords) return;
          entry.lastRecords = records;
          return this.solve(campaignId, entry, records, changedAt);
        }).catch((err: unknown) => this.set(entry, { ...entry.state, phase: 'failed', error: `Could not read the campaign: ${err instanceof Error ? err.message : String(err)}` }));
      },
      error: (err: unknown) => this.set(entry, { ...entry.state, phase: 'failed', error: `Could not read the campaign: ${err instanceof Error ? err.message : String(err)}` }),
    });
  }

  /** `changedAt`: when the store's change notification arrived (the read of what moved starts then). */
  private async solve(campaignId: string, entry: Entry, records: CampaignRecords, changedAt: number): Promise<void> {
    const readMs = this.now() - changedAt;
    this.set(entry, { ...entry.state, phase: 'solving' });
    const outcome = await this.solver.solve(campaignId, records, solveOptionsFor(this.settings, records.settings));
    if (outcome.status === 'superseded' || outcome.requestId < entry.shownRequest) return;
    entry.shownRequest = outcome.requestId;
    if (outcome.status === 'failed') {
      this.set(entry, { ...entry.state, phase: 'failed', error: `The fit failed: ${outcome.message}` });
      return;
    }
    this.set(entry, {
      phase: 'solved', result: outcome.result, chart: outcome.chart, error: null,
      latitudeReadingCount: records.latitudeReadings.length, arcReadingCount: records.arcReadings.length,
      solveMs: outcome.solveMs, readMs, changeToResultMs: this.now() - changedAt, updatedAtMs: Date.now(),
    });
  }

  private set(entry: Entry, state: LiveFit): void {
    entry.state = state;
    for (const l of entry.listeners) l(state);
  }
}
