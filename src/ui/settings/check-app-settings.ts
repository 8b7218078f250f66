// Settings writes pass the zod schema, which loads with the first save instead of at start-up
// (as the store's record checks do: src/store/load-record-checks.ts). Nothing is written unchecked.
import { RecordChecksUnavailableError } from '../../store/load-record-checks.ts';
import type { AppSettings } from './app-settings.ts';

/**
 * The schema's parse function (the parsed settings, or a ValidationError naming each field), loaded
 * on first use; RecordChecksUnavailableError when its chunk cannot load. Load it before opening a
 * transaction: a Dexie transaction must not await anything else.
 */
export async function loadAppSettingsCheck(): Promise<(input: unknown) => AppSettings> {
  const schema = await import('./app-settings-schema.ts').catch((err: unknown) => {
    throw new RecordChecksUnavailableError('settings', null, err);
  });
  return schema.parseAppSettings;
}

/** The settings as the schema parses them (see loadAppSettingsCheck). */
export async function checkAppSettings(input: unknown): Promise<AppSettings> {
  return (await loadAppSettingsCheck())(input);
}
