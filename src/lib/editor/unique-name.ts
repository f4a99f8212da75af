/**
 * Model names within a workspace: a second model never silently takes a name another one has.
 * Names compare as the database column does (utf8mb4_unicode_ci): ignoring case, accents and
 * trailing blanks, so "Lakes" and "lakes " are the same name.
 */

/** The form two names are compared in: "Lake Müritz " and "lake muritz" give the same key. */
export function modelNameKey(name: string): string {
  return name.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase().trimEnd();
}

/**
 * `name` if none of `taken` is the same name, else the first free "name (2)", "name (3)", …
 * ("Lakes (2)" taken as well → "Lakes (3)"; a wanted "Lakes (2)" that is taken counts on from its
 * base "Lakes"). The result stays within `maxLength` by shortening the base, never the suffix.
 */
export function nextFreeName(name: string, taken: Iterable<string>, maxLength = 200): string {
  const keys = new Set([...taken].map(modelNameKey));
  if (!keys.has(modelNameKey(name))) return name;
  const base = name.replace(/ \(\d+\)$/, '');
  for (let n = 2; ; n++) {
    const suffix = ` (${n})`;
    const candidate = `${base.slice(0, Math.max(0, maxLength - suffix.length))}${suffix}`;
    if (!keys.has(modelNameKey(candidate))) return candidate;
  }
}

/** The base a "name (n)" counts from, for looking up every name a new one could collide with. */
export function nameBase(name: string): string {
  return name.replace(/ \(\d+\)$/, '');
}
