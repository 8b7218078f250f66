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
  return (
    <IonItem button detail routerLink={`/campaigns/${campaignId}/fit`} lines="full"
      data-testid="fit-strip" data-phase={fit.phase} data-arc-count={fit.arcReadingCount} data-latitude-count={fit.latitudeReadingCount}
      data-updated={fit.updatedAtMs ?? 0}>
      <IonLabel>
        <h2>Live fit{fit.phase === 'solving' ? ' (updating…)' : ''}</h2>
        <p>{text}</p>
      </IonLabel>
      {suspects > 0 && <IonNote slot="end" className="af-suspect">{suspects} suspect{suspects === 1 ? '' : 's'}</IonNote>}
    </IonItem>
  );
}
