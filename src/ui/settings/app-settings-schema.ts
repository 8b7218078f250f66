// The zod schema of the device preferences: every settings write passes it (check-app-settings.ts
// loads this module with the first save). Start-up reads use app-settings.ts's per-field checks.
import { z } from 'zod';
import { ESTIMATOR_IDS, LENGTH_UNIT_IDS, MODEL_IDS } from '../../campaign/record-enums.ts';
import { validateRecord } from '../../store/validate-record.ts';
import { ANGLE_FORMATS, THEMES, type AppSettings } from './app-settings.ts';

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
}) satisfies z.ZodType<AppSettings>; // and test/ui/app-settings.test.ts checks the type both ways

/** The whole settings object through the schema: the parsed settings, or a ValidationError naming each field. */
export function parseAppSettings(input: unknown): AppSettings {
  return validateRecord(AppSettingsSchema, input, 'settings');
}
