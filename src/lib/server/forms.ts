/**
 * Form posts on Astro pages (work without JavaScript): validate with the same strict zod schemas as
 * the API, run the action, and on failure give the page a status plus a message naming the field.
 */
import type { AstroGlobal } from 'astro';
import type { ZodTypeAny, z } from 'zod';
import { formObject, HttpError, parseValue, zodToHttpError } from './http.ts';
import { ZodError } from 'zod';

export interface FormState {
  error: string | null;
  field: string | null;
  values: Record<string, string>;
}

export const emptyForm = (values: Record<string, string> = {}): FormState => ({ error: null, field: null, values });

/**
 * Reads the posted form, validates it with `schema` and runs `action`. Returns the action's Response
 * (usually a redirect) on success, or a FormState with the error (and sets Astro.response.status).
 * Extra form fields listed in `ignore` (e.g. "intent") are removed before validation.
 */
export async function runForm<S extends ZodTypeAny>(
  Astro: AstroGlobal,
  schema: S,
  action: (input: z.infer<S>) => Promise<Response>,
  ignore: string[] = [],
): Promise<Response | FormState> {
  let values: Record<string, string> = {};
  try {
    values = await formObject(Astro.request);
    const raw = { ...values };
    for (const k of ignore) delete raw[k];
    for (const [k, v] of Object.entries(raw)) if (v === '' && k === 'next') delete raw[k];
    const input = parseValue(raw, schema);
    return await action(input);
  } catch (err) {
    const e = err instanceof ZodError ? zodToHttpError(err) : err;
    if (e instanceof HttpError) {
      Astro.response.status = e.status;
      if (e.extra.headers) for (const [k, v] of Object.entries(e.extra.headers)) Astro.response.headers.set(k, v);
      const safe = { ...values };
      delete safe.password;
      delete safe.currentPassword;
      delete safe.newPassword;
      return { error: e.message, field: e.extra.field ?? null, values: safe };
    }
    throw err;
  }
}

/** A same-site path to continue to after a form, or the fallback. */
export function safeNext(next: string | null | undefined, fallback = '/'): string {
  return next && /^\/(?!\/)[^\s\\]*$/.test(next) ? next : fallback;
}
