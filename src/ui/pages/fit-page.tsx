// The live fit: estimator and model (campaign settings, synced), the figure — a, 1/f, quadrant —
// with uncertainties and the comparison ellipsoid, fit quality, the chart, and the suspect
// readings with their hints. A suspect opens on tap; excluding one asks for a reason and writes
// an exclusion record (undo deletes it). Flags are never applied silently (design.md "Flags").
import {
  IonBackButton, IonButton, IonButtons, IonContent, IonHeader, IonItem, IonLabel, IonList, IonListHeader, IonNote,
  IonPage, IonSelect, IonSelectOption, IonTitle, IonToolbar,
} from '@ionic/react';
import { useLiveQuery } from 'dexie-react-hooks';
import { useState } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import { ESTIMATOR_IDS, MODEL_IDS, type EstimatorId, type ModelId } from '../../campaign/records.ts';
import type { ReadingResult } from '../../campaign/result.ts';
import { ELLIPSOIDS, isEllipsoidId } from '../../geodesy/index.ts';
import { getCampaign } from '../../store/index.ts';
import { FitChart, SaveStatus, useSaveState } from '../components/index.ts';
import { useAlert } from '../components/use-alert.ts';
import { formatSigned, withUncertainty } from '../format/index.ts';
import { useAppSettings, useLiveFit, useServices } from '../live/index.ts';

export const ESTIMATOR_LABEL: Record<EstimatorId, string> = {
  'least-squares': 'Least squares', 'least-absolute': 'Least absolute deviations (L1)', minimax: 'Minimax (Chebyshev)',
  huber: 'Huber (k = 1.345)', tukey: 'Tukey biweight (c = 4.685)',
};
export const MODEL_LABEL: Record<ModelId, string> = {
  degree: 'Degree length c + m·sin²φ', degree2: 'Degree length with sin⁴φ term', ellipsoid: 'Rigorous (a, f) from the arcs',
};

export function FitPage() {
  const { cid = '' } = useParams();
  const { store } = useServices();
  const { settings } = useAppSettings();
  const navigate = useNavigate();
  const fit = useLiveFit(cid);
  const campaign = useLiveQuery(() => getCampaign(store.db, cid), [store, cid]);
  const presentAlert = useAlert();
  const action = useSaveState();
  const [showAll, setShowAll] = useState(false);
  const r = fit.result;
  const cs = campaign?.record?.settings;
  const estimator = cs?.estimator ?? settings.estimator;
  const model = cs?.model ?? settings.model;
  const refId = (cs?.referenceEllipsoid ?? settings.referenceEllipsoid).toLowerCase().replace(/[\s_-]/g, '');
  const ref = isEllipsoidId(refId) ? ELLIPSOIDS[refId] : null;

  const setSolve = (patch: { estimator?: EstimatorId; model?: ModelId }) => {
    if (!campaign?.record) return;
    void action.run('fit settings', () => store.updateCampaign(cid, { settings: { ...campaign.record?.settings, ...patch } }));
  };

  const open = (x: ReadingResult) => navigate(`/campaigns/${cid}/${x.kind === 'arc' ? 'arcs' : 'latitude'}/${x.id}`);
  const exclude = (x: ReadingResult) => {
    void presentAlert({
      header: `Leave ${x.station ?? 'this reading'} out of the fit?`,
      message: 'Say why; the reason is kept with the exclusion and synced.',
      inputs: [{ name: 'reason', type: 'text', placeholder: 'e.g. cloud during the set', attributes: { 'data-testid': 'exclude-reason' } }],
      buttons: [
        { text: 'Cancel', role: 'cancel' },
        {
          text: 'Exclude', role: 'confirm',
          handler: (values: { reason?: string }) => {
            const reason = (values.reason ?? '').trim();
            if (!reason) return false;
            void action.run(`${x.station ?? x.id} excluded`, () => store.excludeReading(cid, x.id, reason, settings.observer.trim() || `device ${store.deviceId.slice(-6)}`));
            return true;
          },
        },
      ],
    });
  };
  const undo = (x: ReadingResult) => void action.run(`${x.station ?? x.id} back in the fit`, () => store.undoExclusion(cid, x.id));

  const flagged = (r?.readings ?? []).filter((x) => x.suspect || x.excluded).sort((a, b) => Math.abs(b.standardizedResidual) - Math.abs(a.standardizedResidual));
  const shown = showAll ? flagged : flagged.slice(0, 30);

  return (
    <IonPage>
      <IonHeader>
        <IonToolbar color="primary">
          <IonButtons slot="start"><IonBackButton defaultHref={`/campaigns/${cid}`} text="Campaign" /></IonButtons>
          <IonTitle>Fit</IonTitle>
        </IonToolbar>
      </IonHeader>
      <IonContent>
        <IonList>
          <IonItem>
            <IonSelect label="Estimator" labelPlacement="stacked" interface="action-sheet" value={estimator} data-testid="fit-estimator"
              onIonChange={(e) => setSolve({ estimator: e.detail.value as EstimatorId })}>
              {ESTIMATOR_IDS.map((id) => <IonSelectOption key={id} value={id}>{ESTIMATOR_LABEL[id]}</IonSelectOption>)}
            </IonSelect>
          </IonItem>
          <IonItem>
            <IonSelect label="Model" labelPlacement="stacked" interface="action-sheet" value={model} data-testid="fit-model"
              onIonChange={(e) => setSolve({ model: e.detail.value as ModelId })}>
              {MODEL_IDS.map((id) => <IonSelectOption key={id} value={id}>{MODEL_LABEL[id]}</IonSelectOption>)}
            </IonSelect>
          </IonItem>
        </IonList>
        <SaveStatus state={action.state} />

        <div className="af-card" data-testid="fit-figure" data-phase={fit.phase} data-status={r?.status ?? ''}>
          <h2>Figure of the Earth {fit.phase === 'solving' && <small>(updating…)</small>}</h2>
          {fit.phase === 'failed' && <p className="af-error">{fit.error}</p>}
          {!r && fit.phase !== 'failed' && <p className="af-hint">Computing…</p>}
          {r && r.status !== 'ok' && <p className="af-status-banner" data-testid="fit-status">{r.statusMessage}</p>}
          {r && !r.converged && <p className="af-status-banner">Did not converge: {r.reason} ({r.iterations} iterations). Numbers shown with that warning.</p>}
          {r?.figure && (
            <>
              <div className="af-row"><span>Semi-major axis a</span><span className="af-value" data-testid="fit-a">{withUncertainty(r.figure.semiMajorAxisM, r.figure.semiMajorAxisStdM, 0, 'm')}</span></div>
              <div className="af-row"><span>Inverse flattening 1/f</span><span className="af-value" data-testid="fit-inverse-f">{withUncertainty(r.figure.inverseFlattening, r.figure.inverseFlatteningStd, 2)}</span></div>
              <div className="af-row"><span>Meridian quadrant</span><span className="af-value" data-testid="fit-quadrant">{withUncertainty(r.figure.quadrantM, r.figure.quadrantStdM, 0, 'm')}</span></div>
              {ref && (
                <div className="af-row"><span>vs {ref.name}</span><span className="af-value" data-testid="fit-vs-reference">
                  Δa {formatSigned(r.figure.semiMajorAxisM - ref.semiMajorAxisM, 0)} m · Δ(1/f) {formatSigned(r.figure.inverseFlattening - 1 / ref.flattening, 2)}</span></div>
              )}
              <p className="af-hint">{r.figure.inversion}</p>
            </>
          )}
          {r && r.coefficients.length > 0 && r.model !== 'ellipsoid' && (
            <div className="af-row"><span>Coefficients</span><span className="af-value">{r.coefficients.map((c) => `${c.name} = ${withUncertainty(c.value, c.standardError, 2)}`).join('; ')}</span></div>
          )}
          {r?.modelError && <p className="af-hint" data-testid="fit-model-error">{r.modelError.statement}</p>}
        </div>

        {r && (
          <div className="af-card" data-testid="fit-quality">
            <h2>Fit quality ({ESTIMATOR_LABEL[r.estimator]})</h2>
            <div className="af-row"><span>RMS residual</span><span className="af-value">{r.quality.rms.toFixed(3)} {r.quality.unit}</span></div>
            <div className="af-row"><span>Largest residual</span><span className="af-value">{r.quality.maxAbsResidual.toFixed(3)} {r.quality.unit}</span></div>
            {r.quality.varianceFactor !== null && <div className="af-row"><span>Variance factor σ₀²</span><span className="af-value">{r.quality.varianceFactor.toFixed(2)}</span></div>}
            {r.quality.chiSquare && (
              <div className="af-row"><span>Global χ² test</span><span className={r.quality.chiSquare.passes ? 'af-value' : 'af-value af-suspect'}>
                {r.quality.chiSquare.passes ? 'passes' : 'fails'} (p = {r.quality.chiSquare.pValue.toPrecision(2)}, {r.quality.chiSquare.degreesOfFreedom} dof)</span></div>
            )}
            <div className="af-row"><span>Iterations</span><span className="af-value">{r.iterations} · {r.converged ? 'converged' : 'not converged'}</span></div>
            {fit.solveMs !== null && <div className="af-row"><span>Solve time</span><span className="af-value">{fit.solveMs.toFixed(0)} ms</span></div>}
          </div>
        )}

        {fit.chart && (
          <div className="af-card">
            <h2>Degree length against sin²φ</h2>
            <FitChart data={fit.chart} onPick={(id) => { const x = r?.readings.find((y) => y.id === id); if (x) open(x); }} />
            <p className="af-hint">Line: fitted curve. Dots: arcs, each its residual from the line. ◇ suspect, ○ excluded.</p>
          </div>
        )}

        <IonList data-testid="suspect-list">
          <IonListHeader><IonLabel>Suspect readings ({flagged.filter((x) => x.suspect && !x.excluded).length}) — threshold {r?.suspectThreshold ?? '…'}σ</IonLabel></IonListHeader>
          {r && flagged.length === 0 && <p className="af-hint">No reading stands out.</p>}
          {shown.map((x) => (
            <IonItem key={x.id} data-testid="suspect-item" data-reading-id={x.id} data-excluded={x.excluded ? '1' : '0'}>
              <IonLabel className={x.excluded ? 'af-excluded' : undefined} onClick={() => open(x)} style={{ cursor: 'pointer' }}>
                <h2 className={x.excluded ? undefined : 'af-suspect'}>{x.hint || `${x.station ?? x.id}: ${formatSigned(x.standardizedResidual, 1)}σ`}</h2>
                <p>{x.kind === 'arc' ? 'arc' : 'latitude'} {x.station ?? ''} · residual {formatSigned(x.residual, 2)} {x.residualUnit}{x.excluded ? ' · excluded' : ''}</p>
              </IonLabel>
              <IonNote slot="end">
                {x.excluded
                  ? <IonButton fill="outline" onClick={() => undo(x)} data-testid="undo-exclusion">Undo</IonButton>
                  : <IonButton fill="outline" onClick={() => exclude(x)} data-testid="exclude-reading">Exclude</IonButton>}
              </IonNote>
            </IonItem>
          ))}
          {flagged.length > shown.length && <IonButton fill="clear" onClick={() => setShowAll(true)}>Show all {flagged.length}</IonButton>}
        </IonList>
      </IonContent>
    </IonPage>
  );
}
