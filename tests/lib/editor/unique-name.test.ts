import { describe, it, expect } from 'vitest';
import { modelNameKey, nameBase, nextFreeName } from '../../../src/lib/editor';

describe('nextFreeName', () => {
  it('nextFreeName(name, taken) keeps a free name as it is', () => {
    expect(nextFreeName('Fenn ponds', ['Reed marsh'])).toBe('Fenn ponds');
    expect(nextFreeName('Fenn ponds', [])).toBe('Fenn ponds');
  });
  it('nextFreeName(name, taken) gives the first free "(n)"', () => {
    expect(nextFreeName('Fenn ponds', ['Fenn ponds'])).toBe('Fenn ponds (2)');
    expect(nextFreeName('Fenn ponds', ['Fenn ponds', 'Fenn ponds (2)', 'Fenn ponds (4)'])).toBe('Fenn ponds (3)');
  });
  it('nextFreeName compares as the database does: case, accents and trailing blanks ignored', () => {
    expect(nextFreeName('fenn PONDS', ['Fenn ponds'])).toBe('fenn PONDS (2)');
    expect(nextFreeName('Lake Muritz', ['Lake Müritz '])).toBe('Lake Muritz (2)');
  });
  it('nextFreeName of a taken "name (2)" counts on from its base', () => {
    expect(nextFreeName('Fenn ponds (2)', ['Fenn ponds', 'Fenn ponds (2)'])).toBe('Fenn ponds (3)');
  });
  it('nextFreeName shortens the base, never the suffix, to stay within maxLength', () => {
    const long = 'x'.repeat(200);
    const out = nextFreeName(long, [long]);
    expect(out).toHaveLength(200);
    expect(out.endsWith(' (2)')).toBe(true);
  });
  it('modelNameKey and nameBase', () => {
    expect(modelNameKey('Lake Müritz  ')).toBe('lake muritz');
    expect(nameBase('Fenn ponds (12)')).toBe('Fenn ponds');
    expect(nameBase('Fenn (ponds)')).toBe('Fenn (ponds)');
  });
});
