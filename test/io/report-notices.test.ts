// The report's cautions and notice are README.md's, word for word (bold marks aside).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { FIELD_CAUTIONS, LEGAL_NOTICE } from '../../src/io/report-notices.ts';
import { escapeHtml, escapeWithStrong } from '../../src/io/html-escape.ts';

const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
const section = (title: string): string => {
  const start = readme.indexOf(`## ${title}\n`);
  expect(start).toBeGreaterThanOrEqual(0);
  const rest = readme.slice(start + title.length + 4);
  const end = rest.search(/\n## /);
  return (end < 0 ? rest : rest.slice(0, end)).trim();
};
const plain = (s: string): string => s.replace(/\*\*(.+?)\*\*/gs, '[[$1]]').replace(/\s*\n\s*/g, ' ').trim();

describe('report notices', () => {
  it('copies the field cautions from README.md', () => {
    const bullets = section('Field cautions').split(/\n- /).map((b) => plain(b.replace(/^- /, '')));
    expect(FIELD_CAUTIONS).toEqual(bullets);
  });

  it('copies the not-a-legal-survey notice from README.md', () => {
    expect(LEGAL_NOTICE).toBe(plain(section('Not a legal survey')));
  });

  it('escapes text for HTML and turns the bold marks into <strong>', () => {
    expect(escapeHtml(`<b>"K01" & 'K02'</b>`)).toBe('&lt;b&gt;&quot;K01&quot; &amp; &#39;K02&#39;&lt;/b&gt;');
    expect(escapeWithStrong('a [[b<c]] d')).toBe('a <strong>b&lt;c</strong> d');
  });
});
