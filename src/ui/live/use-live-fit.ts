// The running fit of one campaign, from the shared hub (one solve per change, whatever is mounted).
import { useCallback, useSyncExternalStore } from 'react';
import type { LiveFit } from './live-fit-hub.ts';
import { useServices } from './services.tsx';

export function useLiveFit(campaignId: string): LiveFit {
  const { fits } = useServices();
  const subscribe = useCallback((onChange: () => void) => fits.subscribe(campaignId, onChange), [fits, campaignId]);
  const snapshot = useCallback(() => fits.current(campaignId), [fits, campaignId]);
  return useSyncExternalStore(subscribe, snapshot);
}
