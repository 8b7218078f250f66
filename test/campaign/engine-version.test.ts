// engineVersion is a constant in the pure core (no fs there); it must equal package.json "version".
import { readFileSync } from 'node:fs';
import { expect, it } from 'vitest';
import { ENGINE_VERSION } from '../../src/campaign/index.ts';

it('ENGINE_VERSION equals package.json version', () => {
  const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
  expect(ENGINE_VERSION).toBe(pkg.version);
});
