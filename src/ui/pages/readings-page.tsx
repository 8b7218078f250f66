// Every reading of a campaign in observation order, smooth with thousands of rows: a virtualised
// list (@tanstack/react-virtual) over an indexed, paged query — only the pages around the visible
// rows are read, through the [campaignId+deleted+observedMs] index, and totals come from .count()
// (field-traps ).
import {
  IonBackButton, IonButtons, IonContent, IonHeader, IonLabel, IonPage, IonSegment, IonSegmentButton, IonTitle, IonToolbar,
} from '@ionic/react';
import { useVirtualizer } from '@tanstack/react-virtual';
import { useLiveQuery } from 'dexie-react-hooks';
import { useRef, useState } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import { countReadings, readingPage, type ArcReadingRow, type LatitudeReadingRow, type ReadingKind } from '../../store/index.ts';
import { formatLatitude, formatLength } from '../format/index.ts';
import { useAppSettings, useLiveFit, useServices } from '../live/index.ts';

/** Rows per indexed page read. */
export const PAGE_ROWS = 100;
const ROW_PX = 64;

export function ReadingsPage() {
  const { cid = '' } = useParams();
  const { store } = useServices();
  const { settings } = useAppSettings();
  const navigate = useNavigate();
  const fit = useLiveFit(cid);
  const [kind, setKind] = useState<ReadingKind>('latitude');
  const scroller = useRef<HTMLDivElement>(null);
  const [range, setRange] = useState({ first: 0, last: 0 });

  const total = useLiveQuery(() => countReadings(store.db, cid, kind), [store, cid, kind]) ?? 0;
  // useVirtualizer returns functions the React Compiler cannot memoise; this component is not compiled.
  // eslint-disable-next-line react-hooks/incompatible-library
  const virtualizer = useVirtualizer({
    count: total, getScrollElement: () => scroller.current, estimateSize: () => ROW_PX, overscan: 10,
    onChange: (v) => {
      const items = v.getVirtualItems();
      if (!items.length) return;
      const first = Math.floor(items[0].index / PAGE_ROWS), last = Math.floor(items[items.length - 1].index / PAGE_ROWS);
      setRange((r) => (r.first === first && r.last === last ? r : { first, last }));
    },
  });
  const page = useLiveQuery(async () => {
    const offset = range.first * PAGE_ROWS;
    const rows = kind === 'latitude'
      ? (await readingPage(store.db, cid, 'latitude', offset, (range.last - range.first + 1) * PAGE_ROWS)).rows
      : (await readingPage(store.db, cid, 'arc', offset, (range.last - range.first + 1) * PAGE_ROWS)).rows;
    const typed: (LatitudeReadingRow | ArcReadingRow)[] = rows;
    return { offset, rows: typed };
  }, [store, cid, kind, range.first, range.last]);
  const flags = new Map((fit.result?.readings ?? []).map((r) => [r.id, r]));

  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref={`/campaigns/${cid}`} text="Campaign" /></IonButtons>
          <IonTitle>Readings ({total})</IonTitle>
        </IonToolbar>
        <IonToolbar>
          <IonSegment value={kind} onIonChange={(e) => { setKind(e.detail.value === 'arc' ? 'arc' : 'latitude'); setRange({ first: 0, last: 0 }); }}>
            <IonSegmentButton value="latitude"><IonLabel>Latitude</IonLabel></IonSegmentButton>
            <IonSegmentButton value="arc"><IonLabel>Arcs</IonLabel></IonSegmentButton>
          </IonSegment>
        </IonToolbar>
      </IonHeader>
      <IonContent scrollY={false}>
        <div ref={scroller} className="af-virtual" style={{ height: '100%' }} data-testid="reading-scroller">
          <div style={{ height: virtualizer.getTotalSize(), position: 'relative' }}>
            {virtualizer.getVirtualItems().map((item) => {
              const row = page && item.index >= page.offset ? page.rows[item.index - page.offset] : undefined;
              const flag = row ? flags.get(row.id) : undefined;
              const cls = flag?.excluded ? 'af-excluded' : flag?.suspect ? 'af-suspect' : undefined;
              let main = '…', sub = '';
              if (row?.record && 'station' in row && 'latitudeDeg' in row.record) {
                main = `${row.station}  ${formatLatitude(row.record.latitudeDeg, settings.angleFormat)}`;
                sub = `${row.record.kind} · σ ${row.record.sigmaArcsec}″ · ${new Date(row.record.observedAt).toLocaleString()}`;
              } else if (row?.record && 'distanceM' in row.record) {
                main = `${row.record.fromStation} – ${row.record.toStation}`;
                sub = formatLength(row.record.distanceM, settings.lengthUnit);
              }
              return (
                <div key={item.key} className="af-virtual-row" data-testid="reading-row" role="button" tabIndex={0}
                  style={{ top: item.start, height: ROW_PX }}
                  onClick={() => row && navigate(`/campaigns/${cid}/${kind === 'arc' ? 'arcs' : 'latitude'}/${row.id}`)}>
                  <div className={cls}><div>{main}</div><small>{sub}</small></div>
                  <small className={cls}>{flag?.excluded ? 'excluded' : flag?.suspect ? `${flag.standardizedResidual.toFixed(1)}σ` : ''}</small>
                </div>
              );
            })}
          </div>
        </div>
      </IonContent>
    </IonPage>
  );
}
