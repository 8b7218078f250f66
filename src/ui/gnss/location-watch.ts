// A GNSS watch for the capture screen: started when the screen becomes visible, cleared when it is
// left or the app pauses (field-traps ). Every call passes explicit options: high
// accuracy, an explicit time-out and no cached positions. The plugin is injected for tests.
import type { Position, PositionOptions } from '@capacitor/geolocation';
import { classifyLocationError, type LocationProblem } from './location-error.ts';

/** Explicit watch options; 15 s lets a cold receiver deliver before a time-out is shown. */
export const WATCH_OPTIONS: PositionOptions = { enableHighAccuracy: true, timeout: 15_000, maximumAge: 0, minimumUpdateInterval: 1_000, enableLocationFallback: true };

export interface GeolocationLike {
  /** Permission state; may throw when location services are off (native). */
  checkPermissions?(): Promise<{ location: string; coarseLocation: string }>;
  watchPosition(options: PositionOptions, callback: (position: Position | null, err?: unknown) => void): Promise<string>;
  clearWatch(options: { id: string }): Promise<void>;
}

export interface WatchHandlers {
  onPosition: (position: Position, receivedMs: number) => void;
  onProblem: (problem: LocationProblem) => void;
}

export class LocationWatch {
  private id: string | null = null;
  private stopped = false;

  constructor(private readonly geo: GeolocationLike, private readonly handlers: WatchHandlers, private readonly now: () => number = Date.now) {}

  async start(): Promise<void> {
    this.stopped = false;
    try {
      const id = await this.geo.watchPosition(WATCH_OPTIONS, (position, err) => {
        if (this.stopped) return;
        // The plugin may call back with (null, err) — handle both halves.
        if (position) this.handlers.onPosition(position, this.now());
        else this.handlers.onProblem(classifyLocationError(err ?? new Error('no position')));
      });
      if (this.stopped) await this.geo.clearWatch({ id });
      else this.id = id;
    } catch (err) {
      this.handlers.onProblem(classifyLocationError(err));
    }
  }

  async stop(): Promise<void> {
    this.stopped = true;
    const id = this.id;
    this.id = null;
    if (id !== null) await this.geo.clearWatch({ id });
  }
}
