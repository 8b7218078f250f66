// Device preferences (kept in the store's local settings, never synced). Campaign-level solve
// settings (records.ts CampaignSettings, synced) override the defaults here.
import { z } from 'zod';
import { ESTIMATOR_IDS, LENGTH_UNIT_IDS, MODEL_IDS, type CampaignSettings } from '../../campaign/records.ts';
import type { SolveRequestOptions } from '../../worker/index.ts';

export const SETTING_APP = 'app';

export const THEMES = ['system', 'light', 'dark'] as const;
export const ANGLE_FORMATS = ['dms', 'decimal'] as const;

export const AppSettingsSchema = z.strictObject({
  estimator: z.enum(ESTIMATOR_IDS),
  model: z.enum(MODEL_IDS),
  referenceEllipsoid: z.string().min(1).max(40),
  suspectThreshold: z.number().finite().min(1, 'at least 1').max(20, 'at most 20'),
  lengthUnit: z.enum(LENGTH_UNIT_IDS),
  angleFormat: z.enum(ANGLE_FORMATS),
  theme: z.enum(THEMES),
  highContrast: z.boolean(),
  reduceMotion: z.boolean(),
  /** Name written on exclusions ("excluded by"). */
  observer: z.string().max(200),
  gnssMinFixes: z.number().int().min(2, 'at least 2').max(500),
  gnssMinSpanS: z.number().finite().min(0).max(3600),
  gnssMaxAccuracyM: z.number().finite().positive().max(500),
});
export type AppSettings = z.infer<typeof AppSettingsSchema>;

export const DEFAULT_APP_SETTINGS: AppSettings = {
  estimator: 'huber',
  model: 'ellipsoid',
  referenceEllipsoid: 'wgs84',
  suspectThreshold: 3, // common practice (design.md "Flags")
  lengthUnit: 'm',
  angleFormat: 'dms',
  theme: 'system',
  highContrast: false,
  reduceMotion: false,
  observer: '',
  gnssMinFixes: 5,
  gnssMinSpanS: 10,
  gnssMaxAccuracyM: 15,
};

/** Stored settings merged over the defaults; an unreadable stored value falls back field by field. */
export function readAppSettings(stored: unknown): AppSettings {
  const out: Record<string, unknown> = { ...DEFAULT_APP_SETTINGS };
  if (stored && typeof stored === 'object') {
    const shape = AppSettingsSchema.shape;
    for (const [k, v] of Object.entries(stored)) {
      const field = shape[k as keyof typeof shape];
      if (field?.safeParse(v).success) out[k] = v;
    }
  }
  return out as AppSettings;
}

/** Solve options for a campaign: its own synced settings first, then this device's defaults. */
export function solveOptionsFor(app: AppSettings, campaign: CampaignSettings | undefined): SolveRequestOptions {
  return {
    estimator: campaign?.estimator ?? app.estimator,
    model: campaign?.model ?? app.model,
    weighting: campaign?.weighting ?? 'propagated',
    suspectThreshold: campaign?.suspectThreshold ?? app.suspectThreshold,
    referenceEllipsoid: campaign?.referenceEllipsoid ?? app.referenceEllipsoid,
    ...(campaign?.latitudeKind ? { latitudeKind: campaign.latitudeKind } : {}),
  };
}
