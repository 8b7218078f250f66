// Merge rules (src/sync/merge.ts): fixed cases for each decision, and a seeded property that the
// final record state does not depend on arrival order. The expected final state is computed by
// brute force from the definition (greatest put by (hlc, device); greatest delete once any delete
// exists), not by the code under test.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { compareVersions, mergeChange, versionOf, type IncomingVersion, type RecordVersion } from '../../src/sync/merge.ts';

const stamp = (ms: number, c = 0) => `${String(ms).padStart(16, '0')}:${String(c).padStart(5, '0')}`;
const v = (id: string, ms: number, dev: string, op: 'put' | 'delete', base: number | null): IncomingVersion =>
  ({ changeId: id, hlc: stamp(ms), deviceId: dev, op, baseHlc: base === null ? null : stamp(base) });
const cur = (x: IncomingVersion): RecordVersion => versionOf(x);

describe('mergeChange — each decision', () => {
  const a = v('a', 100, 'dev-A', 'put', null);
  it('applies a new record', () => {
    expect(mergeChange(null, a)).toEqual({ action: 'apply', reason: 'new-record', loser: null });
  });
  it('ignores a duplicate (same change id or same hlc+device)', () => {
    expect(mergeChange(cur(a), a).action).toBe('ignore');
    expect(mergeChange(cur(a), { ...a, changeId: 'other' }).reason).toBe('duplicate');
  });
  it('applies a successor without a conflict', () => {
    expect(mergeChange(cur(a), v('b', 200, 'dev-B', 'put', 100))).toEqual({ action: 'apply', reason: 'successor', loser: null });
  });
  it('ignores the base of the current version', () => {
    const b = v('b', 200, 'dev-B', 'put', 100);
    expect(mergeChange(cur(b), a)).toEqual({ action: 'ignore', reason: 'superseded', loser: null });
  });
  it('concurrent puts: the newer wins and the displaced current is kept', () => {
    const b = v('b', 200, 'dev-B', 'put', 100);
    const c = v('c', 300, 'dev-C', 'put', 100);
    expect(mergeChange(cur(b), c)).toEqual({ action: 'apply', reason: 'newer-concurrent', loser: 'current' });
    expect(mergeChange(cur(c), b)).toEqual({ action: 'conflict', reason: 'older-concurrent', loser: 'incoming' });
  });
  it('equal stamps are ordered by device id (code units, not locale)', () => {
    const lower = v('x', 500, 'Zed', 'put', 100); // 'Z' (0x5A) sorts before 'a' (0x61)
    const upper = v('y', 500, 'alpha', 'put', 100);
    expect(compareVersions(lower, upper)).toBe(-1);
    expect(mergeChange(cur(lower), upper).action).toBe('apply');
    expect(mergeChange(cur(upper), lower).action).toBe('conflict');
  });
  it('a delete wins over a newer concurrent edit, which is kept', () => {
    const edit = v('e', 900, 'dev-B', 'put', 100);
    expect(mergeChange(cur(edit), v('d', 150, 'dev-C', 'delete', 100))).toEqual({ action: 'apply', reason: 'delete', loser: 'current' });
    expect(mergeChange(cur(edit), v('d', 950, 'dev-C', 'delete', 900))).toEqual({ action: 'apply', reason: 'delete', loser: null });
  });
  it('a tombstone never comes back, and a put it did not see is kept', () => {
    const del = v('d', 150, 'dev-C', 'delete', 100);
    expect(mergeChange(cur(del), v('late', 99_999, 'dev-B', 'put', 100))).toEqual({ action: 'tombstone-wins', reason: 'deleted-after', loser: 'incoming' });
    expect(mergeChange(cur(del), a)).toEqual({ action: 'ignore', reason: 'superseded', loser: null });
    expect(mergeChange(cur(del), v('d2', 120, 'dev-B', 'delete', 100)).reason).toBe('older-delete');
    expect(mergeChange(cur(del), v('d3', 180, 'dev-B', 'delete', 100)).reason).toBe('later-delete');
  });
});

describe('mergeChange — order independence (property)', () => {
  it('every arrival order gives the brute-force final version', () => {
    const versionArb = fc.record({
      ms: fc.integer({ min: 1, max: 6 }), // few stamps, so ties by device id are frequent
      dev: fc.constantFrom('d1', 'd2', 'D3'),
      op: fc.constantFrom<'put' | 'delete'>('put', 'put', 'delete'),
      base: fc.option(fc.integer({ min: 1, max: 6 }), { nil: null }),
    });
    const setArb = fc.uniqueArray(versionArb, { minLength: 1, maxLength: 7, selector: (x) => `${x.ms}/${x.dev}` });
    const seed = Number(process.env.ARCFIELD_SEED ?? 20260101);
    console.log(`merge order-independence property: seed ${seed} (replay with ARCFIELD_SEED=${seed})`);
    fc.assert(fc.property(setArb, fc.infiniteStream(fc.nat()), (set, rnd) => {
      const changes = set.map((x, i) => v(`c${i}`, x.ms, x.dev, x.op, x.base));
      // Brute force from the definition.
      const key = (x: IncomingVersion) => `${x.hlc}|${x.deviceId}`;
      const greatest = (xs: IncomingVersion[]) => xs.reduce((m, x) => (key(x) > key(m) ? x : m));
      const deletes = changes.filter((x) => x.op === 'delete');
      const expected = deletes.length > 0 ? greatest(deletes) : greatest(changes);
      // A random arrival order (Fisher–Yates with the stream's numbers).
      const order = [...changes];
      const draws = rnd[Symbol.iterator]();
      for (let i = order.length - 1; i > 0; i--) {
        const j = Number(draws.next().value) % (i + 1);
        [order[i], order[j]] = [order[j], order[i]];
      }
      let state: RecordVersion | null = null;
      for (const x of order) if (mergeChange(state, x).action === 'apply') state = versionOf(x);
      expect(state?.changeId).toBe(expected.changeId);
    }), { seed, numRuns: 2000 });
  });
});
