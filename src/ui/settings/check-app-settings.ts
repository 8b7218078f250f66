// Settings writes pass the zod schema, which loads with the first save instead of at start-up
// (as the store's record checks do: src/store/load-record-checks.ts). Nothing is written unchecked.
import { RecordChecksUnavailableError } from '../../store/load-record-checks.ts';
import type { AppSettings } from './app-settings.ts';

/** The settings as the schema parses them; ValidationError if refused, RecordChecksUnavailableError if the schema cannot load. */
export async function checkAppSettings(input: unknown): Promise<AppSettings> {
  const schema = await import('./app-settings-schema.ts').catch((err: unknown) => {
    throw new RecordChecksUnavailableError('settings', input, err);
  });
  return schema.parseAppSettings(input);
}
