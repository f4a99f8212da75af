import type { AstroCookies } from 'astro';
import type { Cookie } from 'lucia';

export function applyCookie(cookies: AstroCookies, cookie: Cookie): void {
  cookies.set(cookie.name, cookie.value, cookie.attributes);
}
