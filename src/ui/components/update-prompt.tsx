// "A new version is ready": the person decides when to reload (never a silent reload that could
// lose a form, field-traps ). Drafts are kept in storage, so reloading loses nothing typed.
import { IonButton, IonToolbar } from '@ionic/react';
import { useEffect, useState } from 'react';
import { useServices } from '../live/index.ts';

export function UpdatePrompt() {
  const { updates } = useServices();
  const [state, setState] = useState(updates.current);
  useEffect(() => updates.subscribe(setState), [updates]);
  if (state.databaseReplaced) {
    return (
      <IonToolbar color="warning" data-testid="database-replaced" role="alert">
        <div style={{ padding: '8px 12px' }}>
          arcfield was updated in another tab. Reload this tab to keep working; your drafts are kept.
          <div style={{ marginTop: 6 }}><IonButton color="light" onClick={() => window.location.reload()}>Reload</IonButton></div>
        </div>
      </IonToolbar>
    );
  }
  if (!state.needReload) return null;
  return (
    <IonToolbar color="warning" data-testid="update-prompt" role="status">
      <div style={{ padding: '8px 12px' }}>
        A new version of arcfield is ready. Your drafts are kept.
        <div style={{ display: 'flex', gap: 8, marginTop: 6 }}>
          <IonButton color="light" onClick={() => void updates.reloadNow()} data-testid="update-reload">Reload now</IonButton>
          <IonButton fill="outline" color="light" onClick={() => updates.dismiss()}>Later</IonButton>
        </div>
      </div>
    </IonToolbar>
  );
}
