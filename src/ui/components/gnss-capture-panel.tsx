// "Take a GNSS fix": a watch runs while this panel is open on a visible screen (stopped on leave
// and when the app is hidden, field-traps ); every fix is kept raw for audit as it arrives
// the running average, its gates and its scatter are shown; "Use this average" hands the
// result to the form. The fix is taken BEFORE the save transaction.
import { IonButton, useIonViewWillLeave } from '@ionic/react';
import { useEffect, useRef, useState } from 'react';
import { v7 as uuidv7 } from 'uuid';
import type { GnssFix } from '../../campaign/records.ts';
import { averageFixes, classifyLocationError, LocationWatch, type GnssAverage, type LocationProblem, type RawFix } from '../gnss/index.ts';
import { useAppSettings, useServices } from '../live/index.ts';

export interface GnssResult {
  average: GnssAverage;
  fixes: GnssFix[];
  rawFixIds: string[];
}

const REJECTION_WORDS: Record<string, string> = {
  'before-capture': 'older than this capture',
  'in-future': 'stamped in the future',
  'first-of-session': 'first fix (often a cached one)',
  'too-inaccurate': 'accuracy worse than the gate',
  outlier: 'far from the others',
  'not-finite': 'unreadable',
};

/** Device wall clock (the freshness gate compares fix times with it). */
const wallClockMs = (): number => Date.now();

export function GnssCapturePanel({ campaignId, onUse }: { campaignId: string; onUse: (r: GnssResult) => void }) {
  const { store, geolocation, platform } = useServices();
  const { settings } = useAppSettings();
  const [running, setRunning] = useState(false);
  const [fixes, setFixes] = useState<RawFix[]>([]);
  const [problem, setProblem] = useState<LocationProblem | null>(null);
  const [keepError, setKeepError] = useState<string | null>(null);
  const rawIds = useRef<string[]>([]);
  const watch = useRef<LocationWatch | null>(null);
  const session = useRef<{ id: string; permission: 'precise' | 'coarse' | 'unknown' }>({ id: '', permission: 'unknown' });
  // Capture start and the latest callback time are state (they feed the average shown on screen).
  const [captureStartMs, setCaptureStartMs] = useState(0);
  const [now, setNow] = useState(0);

  const stop = () => {
    const w = watch.current;
    watch.current = null;
    setRunning(false);
    if (w) void w.stop().catch((err: unknown) => setProblem(classifyLocationError(err)));
  };

  const start = async (fresh: boolean) => {
    if (watch.current) return;
    if (fresh) { setFixes([]); rawIds.current = []; setCaptureStartMs(wallClockMs()); }
    session.current.id = uuidv7();
    setProblem(null);
    try {
      const p = await geolocation.checkPermissions?.();
      if (p) session.current.permission = p.location === 'granted' ? 'precise' : p.coarseLocation === 'granted' ? 'coarse' : 'unknown';
      if (p && p.location === 'denied' && p.coarseLocation === 'denied') { setProblem(classifyLocationError({ code: 1, message: 'permission denied' })); return; }
    } catch (err) {
      setProblem(classifyLocationError(err));
      return;
    }
    const w = new LocationWatch(geolocation, {
      onPosition: (pos, receivedMs) => {
        const fix: RawFix = {
          latitudeDeg: pos.coords.latitude, longitudeDeg: pos.coords.longitude, accuracyM: pos.coords.accuracy,
          altitudeM: pos.coords.altitude ?? null, fixMs: pos.timestamp, sessionId: session.current.id,
        };
        setProblem(null);
        setNow(receivedMs);
        setFixes((xs) => [...xs, fix]);
        store.keepRawFix({
          campaignId, sessionId: fix.sessionId, latitudeDeg: fix.latitudeDeg, longitudeDeg: fix.longitudeDeg, accuracyM: fix.accuracyM,
          altitudeM: fix.altitudeM, altitudeAccuracyM: pos.coords.altitudeAccuracy ?? null, headingDeg: pos.coords.heading ?? null,
          speedMps: pos.coords.speed ?? null, fixMs: fix.fixMs, receivedMs, platform, permission: session.current.permission,
          accepted: 1, rejectReason: null,
        }).then((id) => { rawIds.current.push(id); }, (err: unknown) => setKeepError(`A raw fix could not be kept: ${err instanceof Error ? err.message : String(err)}`));
      },
      onProblem: (p) => setProblem(p),
    });
    watch.current = w;
    setRunning(true);
    await w.start();
  };

  // Stop when the screen is left (Ionic keeps the page mounted) or unmounted; pause when hidden.
  useIonViewWillLeave(() => stop());
  useEffect(() => () => { void watch.current?.stop(); watch.current = null; }, []);
  useEffect(() => {
    const onVis = () => {
      if (document.visibilityState === 'hidden' && watch.current) { stop(); setProblem({ kind: 'timeout', message: 'Capture paused while the app was in the background. Tap Resume.', detail: 'hidden' }); }
    };
    document.addEventListener('visibilitychange', onVis);
    return () => document.removeEventListener('visibilitychange', onVis);
  }, []);

  const avg = fixes.length ? averageFixes(fixes, {
    captureStartMs, nowMs: now, minFixes: settings.gnssMinFixes, minSpanS: settings.gnssMinSpanS, maxAccuracyM: settings.gnssMaxAccuracyM,
  }) : null;
  const last = fixes.length ? fixes[fixes.length - 1] : null;

  const use = () => {
    if (!avg || avg.status !== 'ok') return;
    stop();
    const kept = avg.verdicts.filter((v) => v.accepted).map((v) => v.fix);
    onUse({
      average: avg,
      fixes: kept.map((f) => ({ latitudeDeg: f.latitudeDeg, longitudeDeg: f.longitudeDeg, accuracyM: f.accuracyM, altitudeM: f.altitudeM, fixTime: new Date(f.fixMs).toISOString() })),
      rawFixIds: [...rawIds.current],
    });
  };

  return (
    <div className="af-card" data-testid="gnss-panel">
      <h2>GNSS fix (geodetic latitude)</h2>
      {!running && !fixes.length && <p className="af-hint">Hold the phone still with open sky. At least {settings.gnssMinFixes} fixes over {settings.gnssMinSpanS} s are averaged.</p>}
      {last && (
        <div className="af-row"><span>Latest fix</span><span className="af-value" data-testid="gnss-live-accuracy">±{last.accuracyM.toFixed(1)} m (device estimate)</span></div>
      )}
      {avg && (
        <>
          <div className="af-row"><span>Fixes kept / received</span><span className="af-value" data-testid="gnss-count">{avg.n} / {fixes.length}</span></div>
          <div className="af-row"><span>Time span</span><span className="af-value">{avg.spanS.toFixed(0)} s</span></div>
          {avg.scatterM !== null && <div className="af-row"><span>Scatter of the fixes</span><span className="af-value" data-testid="gnss-scatter">{avg.scatterM.toFixed(2)} m</span></div>}
          <p className={avg.status === 'ok' ? 'af-echo' : 'af-hint'} data-testid="gnss-status" data-status={avg.status}>{avg.message}</p>
          {avg.verdicts.some((v) => !v.accepted) && (
            <p className="af-hint">Left out: {Object.entries(avg.verdicts.filter((v) => !v.accepted).reduce<Record<string, number>>((m, v) => {
              const k = REJECTION_WORDS[v.reason ?? ''] ?? String(v.reason); m[k] = (m[k] ?? 0) + 1; return m;
            }, {})).map(([k, n]) => `${n} ${k}`).join(', ')}.</p>
          )}
          <p className="af-hint">Accuracy is the phone&apos;s own estimate; its confidence level differs between phones and browsers.</p>
        </>
      )}
      {problem && <p className="af-error" role="alert" data-testid="gnss-problem" data-kind={problem.kind}>{problem.message}</p>}
      {keepError && <p className="af-error">{keepError}</p>}
      <div className="af-actions">
        {running
          ? <IonButton expand="block" fill="outline" onClick={stop} data-testid="gnss-stop">Stop</IonButton>
          : <IonButton expand="block" onClick={() => void start(fixes.length === 0)} data-testid="gnss-start">{fixes.length ? 'Resume' : 'Take a GNSS fix'}</IonButton>}
        <IonButton expand="block" disabled={avg?.status !== 'ok'} onClick={use} data-testid="gnss-use">Use this average</IonButton>
      </div>
      {fixes.length > 0 && !running && <IonButton fill="clear" onClick={() => { setFixes([]); rawIds.current = []; }}>Discard these fixes</IonButton>}
    </div>
  );
}
