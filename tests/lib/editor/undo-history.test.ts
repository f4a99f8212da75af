import { describe, expect, it } from 'vitest';
import { changeKind, recordChange, redo, startHistory, undo } from '../../../src/lib/editor/undo-history.ts';

describe('recordChange / undo / redo', () => {
  it('undo returns the previous state and redo the undone one, in order', () => {
    let h = startHistory('a');
    h = recordChange(h, 'b', null, 0);
    h = recordChange(h, 'c', null, 10);
    h = undo(h);
    expect(h.present).toBe('b');
    h = undo(h);
    expect(h.present).toBe('a');
    expect(undo(h)).toBe(h);
    h = redo(h);
    expect(h.present).toBe('b');
    h = redo(redo(h));
    expect(h.present).toBe('c');
  });
  it('a new change after undo drops the redo branch', () => {
    const h = recordChange(undo(recordChange(startHistory(1), 2, null, 0)), 3, null, 5);
    expect(h.future).toEqual([]);
    expect(undo(h).present).toBe(1);
  });
  it('changes of one kind within mergeWithinMs are one step; other kinds, null kinds and pauses are not', () => {
    let h = startHistory('');
    h = recordChange(h, 'r', 'typing:rate', 0);
    h = recordChange(h, 'ra', 'typing:rate', 300);
    h = recordChange(h, 'rat', 'typing:rate', 600);
    expect(undo(h).present).toBe('');
    h = recordChange(h, 'rate', 'typing:rate', 2000);
    expect(undo(h).present).toBe('rat');
    h = recordChange(h, 'rate!', null, 2100);
    h = recordChange(h, 'rate!!', null, 2150);
    expect(undo(h).present).toBe('rate!');
  });
  it('keeps at most `limit` steps', () => {
    let h = startHistory(0);
    for (let i = 1; i <= 10; i++) h = recordChange(h, i, null, i * 1000, { limit: 3 });
    expect(h.past).toEqual([7, 8, 9]);
  });
});

describe('changeKind(before, after)', () => {
  const base = { name: '', rate: '', nodes: [], links: [], parameters: [] };
  it('is null when nodes, links or parameters are added or removed', () => {
    expect(changeKind(base, { ...base, nodes: [{ id: 'n1' }] })).toBeNull();
    expect(changeKind(base, { ...base, parameters: [{ name: 'a', value: '0' }] })).toBeNull();
  });
  it('names the changed parts otherwise', () => {
    expect(changeKind(base, { ...base, rate: 'x' })).toBe('typing:rate');
  });
});
