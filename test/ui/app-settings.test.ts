// The start-up settings read (hand-written per-field checks, no zod) must accept exactly what the
// zod schema that guards every settings write accepts. The reference is the schema itself
// (AppSettingsSchema.shape[field].safeParse), asked about the same edge values field by field.
import { describe, expect, expectTypeOf, it } from 'vitest';
import type { z } from 'zod';
import { ValidationError } from '../../src/errors.ts';
import { APP_SETTING_CHECKS, DEFAULT_APP_SETTINGS, readAppSettings, type AppSettings } from '../../src/ui/settings/app-settings.ts';
import { AppSettingsSchema } from '../../src/ui/settings/app-settings-schema.ts';
import { checkAppSettings } from '../../src/ui/settings/check-app-settings.ts';

// Values around every bound the schema has (enums, lengths 0/1/40/41/200/201, 0, 1, 2, 20, 500,
// 3600, integers and not), plus the wrong types and the non-finite numbers IndexedDB keeps.
const CANDIDATES: readonly unknown[] = [
  undefined, null, true, false, '', 'm', 'km', 'toise', 'mile', 'huber', 'HUBER', 'tukey', 'ellipsoid', 'degree2', 'dms',
  'decimal', 'system', 'dark', 'light', 'wgs84', 'x'.repeat(40), 'x'.repeat(41), 'y'.repeat(200), 'y'.repeat(201), 'K01 crew',
  0, -0, 0.5, 1, 1.5, 2, 2.5, 3, 19.99, 20, 20.01, 499, 500, 500.5, 501, 3599.9, 3600, 3600.1, -1, 1e-9,
  Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, Number.MAX_SAFE_INTEGER + 2,
  '3', [], {}, [3], { value: 3 },
];

describe('start-up settings checks against the settings schema', () => {
  it('cover the same fields as the schema', () => {
    expect(Object.keys(APP_SETTING_CHECKS).sort()).toEqual(Object.keys(AppSettingsSchema.shape).sort());
    expectTypeOf<z.infer<typeof AppSettingsSchema>>().toEqualTypeOf<AppSettings>();
  });

  it('accept and refuse exactly what the schema does, field by field', () => {
    const disagreements: string[] = [];
    for (const [field, check] of Object.entries(APP_SETTING_CHECKS)) {
      const schema = AppSettingsSchema.shape[field as keyof AppSettings];
      for (const v of CANDIDATES) {
        if (check(v) !== schema.safeParse(v).success) disagreements.push(`${field}: ${typeof v === 'string' && v.length > 12 ? `string(${v.length})` : String(v)}`);
      }
    }
    expect(disagreements).toEqual([]);
  });

  it('the defaults pass the schema', () => {
    expect(AppSettingsSchema.safeParse(DEFAULT_APP_SETTINGS).success).toBe(true);
  });
});

describe('readAppSettings', () => {
  it('keeps valid stored fields and falls back field by field', () => {
    const s = readAppSettings({ estimator: 'tukey', suspectThreshold: 25, gnssMinFixes: 7, theme: 'sepia', unknown: 1, observer: 'K crew' });
    expect(s).toEqual({ ...DEFAULT_APP_SETTINGS, estimator: 'tukey', gnssMinFixes: 7, observer: 'K crew' });
  });

  it('ignores inherited keys and non-objects', () => {
    expect(readAppSettings(JSON.parse('{"__proto__": {"estimator": "minimax"}}'))).toEqual(DEFAULT_APP_SETTINGS);
    expect(readAppSettings('huber')).toEqual(DEFAULT_APP_SETTINGS);
    expect(readAppSettings(undefined)).toEqual(DEFAULT_APP_SETTINGS);
  });
});

describe('checkAppSettings (every settings write)', () => {
  it('returns the parsed settings', async () => {
    await expect(checkAppSettings({ ...DEFAULT_APP_SETTINGS, model: 'degree' })).resolves.toEqual({ ...DEFAULT_APP_SETTINGS, model: 'degree' });
  });

  it('refuses with a ValidationError naming field, value and reason', async () => {
    const err: unknown = await checkAppSettings({ ...DEFAULT_APP_SETTINGS, suspectThreshold: 0.5, extra: true }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ValidationError);
    const problems = (err as ValidationError).problems;
    expect(problems).toContainEqual({ field: 'suspectThreshold', value: 0.5, reason: 'at least 1' });
    expect(problems.map((p) => p.field)).toContain('settings');
  });
});
