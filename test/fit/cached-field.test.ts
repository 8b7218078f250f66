// Result fields computed when first read (src/fit/cached-field.ts): the contract the app, the CLI
// and the worker copy rely on — computed once, seen by spread, JSON and structuredClone (the
// HTML structured clone algorithm reads own enumerable properties through [[Get]]), replaced by
// assignment, and independent per object although the accessors are shared per field name.
import { describe, expect, it } from 'vitest';
import { defineCachedField } from '../../src/fit/cached-field.ts';

interface Holder {
  id: number;
  value: number[];
  other?: string;
}

function make(id: number, counter: { calls: number }): Holder {
  const h: Holder = { id, value: [] };
  defineCachedField(h, 'value', () => {
    counter.calls++;
    return [id, id * 2];
  });
  return h;
}

describe('defineCachedField', () => {
  it('computes on first read only, per object', () => {
    const counter = { calls: 0 };
    const a = make(1, counter);
    const b = make(2, counter);
    expect(counter.calls).toBe(0);
    expect(a.value).toEqual([1, 2]);
    expect(a.value).toBe(a.value);
    expect(counter.calls).toBe(1);
    expect(b.value).toEqual([2, 4]);
    expect(counter.calls).toBe(2);
  });

  it('is seen by spread, JSON.stringify and structuredClone, and the hidden state is not', () => {
    const a = make(3, { calls: 0 });
    expect({ ...a }).toEqual({ id: 3, value: [3, 6] });
    expect(JSON.parse(JSON.stringify(a))).toEqual({ id: 3, value: [3, 6] });
    expect(structuredClone(make(4, { calls: 0 }))).toEqual({ id: 4, value: [4, 8] });
    expect(Object.keys(a)).toEqual(['id', 'value']);
  });

  it('assignment replaces the value without computing it, and only on that object', () => {
    const counter = { calls: 0 };
    const a = make(5, counter);
    const b = make(6, counter);
    a.value = [0];
    expect(a.value).toEqual([0]);
    expect(counter.calls).toBe(0);
    expect(b.value).toEqual([6, 12]);
  });

  it('two fields on one object keep separate state', () => {
    const h: Holder = { id: 7, value: [] };
    defineCachedField(h, 'value', () => [1]);
    defineCachedField(h, 'other', () => 'x');
    expect(h.other).toBe('x');
    expect(h.value).toEqual([1]);
  });
});
