// The one-line running estimate shown on the campaign and station screens; tapping opens the fit.
// data-* attributes let the end-to-end test and the bench see when a new answer arrived.
import { IonItem, IonLabel, IonNote } from '@ionic/react';
import { useLiveFit } from '../live/index.ts';

export function LiveFitStrip({ campaignId }: { campaignId: string }) {
  const fit = useLiveFit(campaignId);
  const r = fit.result;
  const suspects = r ? r.readings.filter((x) => x.suspect && !x.excluded).length : 0;
  let text = 'Waiting for the first fit…';
  if (fit.phase === 'failed') text = fit.error ?? 'The fit failed.';
  else if (r && r.figure) text = `a = ${r.figure.semiMajorAxisM.toFixed(0)} m · 1/f = ${r.figure.inverseFlattening.toFixed(2)}`;
  else if (r) text = r.statusMessage;
  // The data-* attributes sit on a plain element: React 19 may set changed props of a custom element
  // (ion-item) as properties rather than attributes, so they would go stale in the DOM.
  return (
    <div data-testid="fit-strip" data-phase={fit.phase} data-arc-count={String(fit.arcReadingCount)}
      data-latitude-count={String(fit.latitudeReadingCount)} data-updated={String(fit.updatedAtMs ?? 0)}
      data-solve-ms={fit.solveMs === null ? '' : fit.solveMs.toFixed(1)} data-change-ms={fit.changeToResultMs === null ? '' : fit.changeToResultMs.toFixed(1)}
      data-read-ms={fit.readMs === null ? '' : fit.readMs.toFixed(1)}>
      <IonItem button detail routerLink={`/campaigns/${campaignId}/fit`} lines="full">
        <IonLabel>
          <h2>Live fit{fit.phase === 'solving' ? ' (updating…)' : ''}</h2>
          <p>{text}</p>
        </IonLabel>
        {suspects > 0 && <IonNote slot="end" className="af-suspect">{suspects} suspect{suspects === 1 ? '' : 's'}</IonNote>}
      </IonItem>
    </div>
  );
}
