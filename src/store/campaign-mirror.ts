// A live in-memory copy of one campaign's records for the running fit, kept current from the
// change log instead of re-reading every row after each save. Measured in Chromium (bench/
// app-refit.ts): re-reading 2,000 readings from IndexedDB costs 150–450 ms, more than the solve;
// the change log names exactly which records moved (every write — a local save, an import, a
// pulled change — adds a change-log row with a higher `seq` in the same transaction), so a refresh
// reads only those rows. Read-write transactions on the log are serialised, so `seq` grows in
// commit order and nothing committed can hide below the last `seq` seen.
// Use: watch `lastChangeSeq` with a Dexie liveQuery (a cheap read that observes the campaign's
// whole change-log range), and call `refresh()` outside the liveQuery when it moves. The mirror is
// stateful, so it must not run inside a liveQuery querier (Dexie may start a new querier run
// before the previous one finished, and would not see reads made after a chained promise).
import type { ArcReading, CampaignRecords, Exclusion, LatitudeReading, RecordKind, Station } from '../campaign/records.ts';
import type { ArcfieldDb } from './arcfield-db.ts';
import type { CampaignRecord } from './campaign-record.ts';
import { loadCampaignRecords } from './campaign-queries.ts';
import { tableOf } from './commit-record.ts';

interface MirrorMaps {
  station: Map<string, Station>;
  latitudeReading: Map<string, LatitudeReading>;
  arcReading: Map<string, ArcReading>;
  exclusion: Map<string, Exclusion>;
}

/** The latest change-log sequence of a campaign (0 when none); observe it with liveQuery. */
export async function lastChangeSeq(db: ArcfieldDb, campaignId: string): Promise<number> {
  const last = await db.changes.where('[campaignId+seq]').between([campaignId, -Infinity], [campaignId, Infinity]).last();
  return last?.seq ?? 0;
}

export interface MirrorRefresh {
  /** undefined when the campaign is not (or no longer) on this device. */
  records: CampaignRecords | undefined;
  /** False when nothing changed since the previous refresh. */
  changed: boolean;
}

export class CampaignMirror {
  private maps: MirrorMaps | null = null;
  private campaign: CampaignRecord | null = null;
  private lastSeq = 0;
  private running: Promise<MirrorRefresh> = Promise.resolve({ records: undefined, changed: false });

  constructor(private readonly db: ArcfieldDb, readonly campaignId: string) {}

  /** The campaign's records now. Calls are serialised (each waits for the previous one). */
  refresh(): Promise<MirrorRefresh> {
    this.running = this.running.then(() => this.step(), () => this.step());
    return this.running;
  }

  /** Forget the copy; the next refresh reads everything again. */
  reset(): void {
    this.maps = null;
  }

  private async step(): Promise<MirrorRefresh> {
    const { db, campaignId } = this;
    return db.transaction('r', [db.changes, db.campaigns, db.stations, db.latitudeReadings, db.arcReadings, db.exclusions], async () => {
      if (!this.maps) {
        const last = await db.changes.where('[campaignId+seq]').between([campaignId, -Infinity], [campaignId, Infinity]).last();
        const all = await loadCampaignRecords(db, campaignId);
        if (!all) return { records: undefined, changed: true };
        this.lastSeq = last?.seq ?? 0;
        this.campaign = (await db.campaigns.get(campaignId))?.record ?? null;
        this.maps = {
          station: new Map(all.stations.map((s) => [s.id ?? s.code, s])),
          latitudeReading: new Map(all.latitudeReadings.map((r) => [r.id, r])),
          arcReading: new Map(all.arcReadings.map((r) => [r.id, r])),
          exclusion: new Map((all.exclusions ?? []).map((r) => [r.id, r])),
        };
        return { records: this.snapshot(), changed: true };
      }
      const fresh = await db.changes.where('[campaignId+seq]').between([campaignId, this.lastSeq + 1], [campaignId, Infinity]).toArray();
      const touched = new Map<string, RecordKind>();
      for (const c of fresh) {
        touched.set(`${c.recordKind}\u0000${c.recordId}`, c.recordKind);
        if (c.seq !== undefined && c.seq > this.lastSeq) this.lastSeq = c.seq;
      }
      for (const [key, kind] of touched) {
        const id = key.slice(kind.length + 1);
        if (kind === 'campaign') {
          const row = await db.campaigns.get(id);
          this.campaign = row && !row.deleted ? row.record : null;
          continue;
        }
        const row = await tableOf(db, kind).get(id);
        const map: Map<string, unknown> = this.maps[kind];
        if (row && !row.deleted && row.record) map.set(id, row.record);
        else map.delete(id);
      }
      return { records: this.snapshot(), changed: touched.size > 0 };
    });
  }

  private snapshot(): CampaignRecords | undefined {
    if (!this.campaign || !this.maps) return undefined;
    return {
      name: this.campaign.name,
      settings: this.campaign.settings,
      stations: [...this.maps.station.values()],
      latitudeReadings: [...this.maps.latitudeReading.values()],
      arcReadings: [...this.maps.arcReading.values()],
      exclusions: [...this.maps.exclusion.values()],
    };
  }
}
