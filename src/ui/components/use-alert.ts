// An alert that asks one question (the fit page's "leave this reading out?"), presented through
// @ionic/core's alert controller. @ionic/react's useIonAlert lives in its one shared module and
// holds ion-alert there, which put ion-alert (about 8 KB gzip) into the app's first chunk; this
// hook imports the element's own module, so ion-alert loads with the screen that uses it.
import { alertController, type AlertOptions } from '@ionic/core/components';
import { defineCustomElement } from '@ionic/core/components/ion-alert.js';
import { useCallback, useEffect, useRef } from 'react';

/** Present an alert (at most one at a time from one screen); it is dismissed when the screen unmounts. */
export function useAlert(): (options: AlertOptions) => Promise<void> {
  const open = useRef<HTMLIonAlertElement | null>(null);
  useEffect(() => () => { void open.current?.dismiss(); }, []);
  return useCallback(async (options: AlertOptions) => {
    if (open.current) return;
    defineCustomElement();
    const alert = await alertController.create(options);
    open.current = alert;
    void alert.onDidDismiss().then(() => { if (open.current === alert) open.current = null; });
    await alert.present();
  }, []);
}
