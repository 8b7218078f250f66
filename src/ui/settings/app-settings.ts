// Device preferences (kept in the store's local settings, never synced). Campaign-level solve
// settings (records.ts CampaignSettings, synced) override the defaults here.
// Reading them at start-up uses the small per-field checks below; writing them passes the zod
// schema (app-settings-schema.ts, loaded with the first save by check-app-settings.ts), so the
// first screen needs no zod. test/ui/app-settings.test.ts holds both to the same answers.
import {
  ESTIMATOR_IDS, LENGTH_UNIT_IDS, MODEL_IDS, type EstimatorId, type LengthUnitId, type ModelId,
} from '../../campaign/record-enums.ts';
import type { CampaignSettings } from '../../campaign/records.ts';
import type { SolveRequestOptions } from '../../worker/index.ts';

export const SETTING_APP = 'app';

export const THEMES = ['system', 'light', 'dark'] as const;
export const ANGLE_FORMATS = ['dms', 'decimal'] as const;

export interface AppSettings {
  estimator: EstimatorId;
  model: ModelId;
  referenceEllipsoid: string;
  suspectThreshold: number;
  lengthUnit: LengthUnitId;
  angleFormat: (typeof ANGLE_FORMATS)[number];
  theme: (typeof THEMES)[number];
  highContrast: boolean;
  reduceMotion: boolean;
  /** Name written on exclusions ("excluded by"). */
  observer: string;
  gnssMinFixes: number;
  gnssMinSpanS: number;
  gnssMaxAccuracyM: number;
}

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

const oneOf = (list: readonly string[]) => (v: unknown): boolean => typeof v === 'string' && list.includes(v);
const finiteIn = (min: number, max: number) => (v: unknown): boolean =>
  typeof v === 'number' && Number.isFinite(v) && v >= min && v <= max;
const textOf = (min: number, max: number) => (v: unknown): boolean => typeof v === 'string' && v.length >= min && v.length <= max;
const isBoolean = (v: unknown): boolean => typeof v === 'boolean';

/**
 * Does a stored value pass its field of the settings schema? The same bounds as
 * AppSettingsSchema, field by field (string lengths in UTF-16 units, as zod counts them).
 */
export const APP_SETTING_CHECKS: { readonly [K in keyof AppSettings]: (v: unknown) => boolean } = {
  estimator: oneOf(ESTIMATOR_IDS),
  model: oneOf(MODEL_IDS),
  referenceEllipsoid: textOf(1, 40),
  suspectThreshold: finiteIn(1, 20),
  lengthUnit: oneOf(LENGTH_UNIT_IDS),
  angleFormat: oneOf(ANGLE_FORMATS),
  theme: oneOf(THEMES),
  highContrast: isBoolean,
  reduceMotion: isBoolean,
  observer: textOf(0, 200),
  gnssMinFixes: (v) => Number.isSafeInteger(v) && finiteIn(2, 500)(v),
  gnssMinSpanS: finiteIn(0, 3600),
  gnssMaxAccuracyM: (v) => finiteIn(0, 500)(v) && v !== 0,
};

const isSettingKey = (k: string): k is keyof AppSettings => Object.prototype.hasOwnProperty.call(APP_SETTING_CHECKS, k);

/** Stored settings merged over the defaults; an unreadable stored value falls back field by field. */
export function readAppSettings(stored: unknown): AppSettings {
  const out: Record<string, unknown> = { ...DEFAULT_APP_SETTINGS };
  if (stored && typeof stored === 'object') {
    for (const [k, v] of Object.entries(stored)) if (isSettingKey(k) && APP_SETTING_CHECKS[k](v)) out[k] = v;
  }
  return out as unknown as AppSettings;
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
