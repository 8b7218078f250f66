// The database was written by a newer server than this one: refuse to start rather than guess.
import { InputError } from '../errors.ts';

export class SchemaVersionError extends InputError {
  override name = 'SchemaVersionError';
  constructor(found: number, known: number) {
    super('database.schemaVersion', found, `this server knows schema versions up to ${known}; upgrade the server before opening this database`);
  }
}
