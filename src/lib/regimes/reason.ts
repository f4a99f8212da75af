import type { NodeState } from './types';

/** "a", "a and b", "a, b and c". */
export function listNames(names: readonly string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** "upper tipped, middle and lower base"; "all tipped"; "all base". */
export function patternWords(pattern: readonly NodeState[], names: readonly string[]): string {
  const tipped = names.filter((_, i) => pattern[i] === 'tipped');
  const base = names.filter((_, i) => pattern[i] === 'base');
  if (base.length === 0) return 'all tipped';
  if (tipped.length === 0) return 'all base';
  return `${listNames(tipped)} tipped, ${listNames(base)} base`;
}
