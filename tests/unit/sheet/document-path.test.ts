import { describe, expect, it } from 'vitest';
import { diffDocuments, getAt, pathText, rebaseDocument, setAt } from '../../../src/lib/sheet/document-path';

const base = { title: 'A', hand: { fingers: [{ roller: { radius: '12 mm' } }, { roller: { radius: '12 mm' } }] }, object: { pose: { position: [0, 0, '90 mm'] } } };

describe('document paths', () => {
  it('reads and writes without touching the original, sharing untouched branches', () => {
    const next = setAt(base, ['hand', 'fingers', 1, 'roller', 'radius'], '16 mm');
    expect(getAt(next, ['hand', 'fingers', 1, 'roller', 'radius'])).toBe('16 mm');
    expect(getAt(base, ['hand', 'fingers', 1, 'roller', 'radius'])).toBe('12 mm');
    expect(next.hand.fingers[0]).toBe(base.hand.fingers[0]);
    expect(next.object).toBe(base.object);
    expect(getAt(base, ['nothing', 'here'])).toBeUndefined();
    expect('title' in setAt(base, ['title'], undefined)).toBe(false);
    expect(pathText(['hand', 'fingers', 0, 'roller', 'radius'])).toBe('hand.fingers[0].roller.radius');
  });

  it('lists the leaves that differ', () => {
    const changed = setAt(setAt(base, ['object', 'pose', 'position', 2], '80 mm'), ['notes'], 'why');
    expect(diffDocuments(base, changed)).toEqual([
      { path: ['object', 'pose', 'position', 2], kind: 'changed', before: '90 mm', after: '80 mm' },
      { path: ['notes'], kind: 'added', before: undefined, after: 'why' },
    ]);
  });

  it('re-applies one side on top of a later revision, keeping both sides and listing overlaps', () => {
    const mine = setAt(setAt(base, ['object', 'pose', 'position', 2], '80 mm'), ['hand', 'fingers', 0, 'roller', 'radius'], '14 mm');
    const theirs = setAt(base, ['hand', 'fingers', 0, 'roller', 'radius'], '13 mm');
    const theirsToo = setAt(theirs, ['title'], 'B');
    const { document, overlapping } = rebaseDocument(base, mine, theirsToo);
    expect(getAt(document, ['title'])).toBe('B');
    expect(getAt(document, ['object', 'pose', 'position', 2])).toBe('80 mm');
    expect(getAt(document, ['hand', 'fingers', 0, 'roller', 'radius'])).toBe('14 mm');
    expect(overlapping).toEqual([{ path: ['hand', 'fingers', 0, 'roller', 'radius'], kind: 'changed', before: '13 mm', after: '14 mm' }]);
  });
});

describe('diffDocuments array rules', () => {
  const before = { hand: { fingers: [{ name: 'a' }, { name: 'b' }] }, tags: ['x'] };
  const after = { hand: { fingers: [{ name: 'a' }, { name: 'c' }, { name: 'd' }] }, tags: ['y'] };

  it('compares resized arrays element by element and lists the extra elements as added or removed, "by-index"', () => {
    expect(diffDocuments(before, after, 'by-index')).toEqual([
      { path: ['hand', 'fingers', 1, 'name'], kind: 'changed', before: 'b', after: 'c' },
      { path: ['hand', 'fingers', 2], kind: 'added', before: undefined, after: { name: 'd' } },
      { path: ['tags', 0], kind: 'changed', before: 'x', after: 'y' },
    ]);
    expect(diffDocuments(after, before, 'by-index')[1]).toEqual({ path: ['hand', 'fingers', 2], kind: 'removed', before: { name: 'd' }, after: undefined });
  });

  it('counts a resized array as one change of the whole array by default, so that rebasing can set it', () => {
    expect(diffDocuments(before, after)).toEqual([
      { path: ['hand', 'fingers'], kind: 'changed', before: before.hand.fingers, after: after.hand.fingers },
      { path: ['tags', 0], kind: 'changed', before: 'x', after: 'y' },
    ]);
    const removed = { ...after, hand: { fingers: [{ name: 'a' }] } };
    expect(rebaseDocument(before, removed, before).document.hand.fingers).toEqual([{ name: 'a' }]);
  });

  it('compares leaves with Object.is and keys on one side only as added or removed, in document order', () => {
    expect(diffDocuments({ a: 1, b: [1, 2], c: null }, { c: null, a: 1, b: [1, 2], d: false })).toEqual([{ path: ['d'], kind: 'added', before: undefined, after: false }]);
    expect(diffDocuments({ a: { deep: 1 } }, {})).toEqual([{ path: ['a'], kind: 'removed', before: { deep: 1 }, after: undefined }]);
    expect(diffDocuments({ a: [1] }, { a: { 0: 1 } })).toEqual([{ path: ['a'], kind: 'changed', before: [1], after: { 0: 1 } }]);
  });
});
