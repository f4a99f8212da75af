import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { errorResponse, HttpError, parseJson, zodToHttpError } from '../../../src/lib/server/http.ts';

const schema = z.object({ name: z.string().max(5), size: z.number() }).strict();

function jsonRequest(body: string, type = 'application/json'): Request {
  return new Request('http://x/', { method: 'POST', body, headers: { 'content-type': type } });
}

describe('zodToHttpError(err)', () => {
  it('names an unknown key as the field with a message quoting it', () => {
    const e = zodToHttpError(schema.safeParse({ name: 'a', size: 1, extra: 2 }).error!);
    expect(e.status).toBe(400);
    expect(e.extra.field).toBe('extra');
    expect(e.message).toBe('unknown field "extra"');
  });

  it('names nested paths with dots and the whole body as (body)', () => {
    const nested = z.object({ items: z.array(z.object({ v: z.number() })) });
    expect(zodToHttpError(nested.safeParse({ items: [{ v: 'x' }] }).error!).extra.field).toBe('items.0.v');
    expect(zodToHttpError(schema.safeParse([]).error!).extra.field).toBe('(body)');
  });
});

describe('parseJson(request, schema)', () => {
  it('returns the parsed value for valid input', async () => {
    await expect(parseJson(jsonRequest('{"name":"ab","size":2}'), schema)).resolves.toEqual({ name: 'ab', size: 2 });
  });

  it('throws 400 invalid_json for malformed JSON, 415 for another content type, 413 past maxBytes', async () => {
    await expect(parseJson(jsonRequest('{"name":'), schema)).rejects.toMatchObject({ status: 400, code: 'invalid_json' });
    await expect(parseJson(jsonRequest('name=x', 'text/plain'), schema)).rejects.toMatchObject({ status: 415 });
    await expect(parseJson(jsonRequest(JSON.stringify({ name: 'x'.repeat(100), size: 1 })), schema, { maxBytes: 50 })).rejects.toMatchObject({ status: 413 });
  });
});

describe('errorResponse(err)', () => {
  it('answers an HttpError as JSON {error:{code,message}} with its status and headers', async () => {
    const res = errorResponse(new HttpError(429, 'rate_limited', 'slow down', { headers: { 'Retry-After': '60' } }));
    expect(res.status).toBe(429);
    expect(res.headers.get('retry-after')).toBe('60');
    expect(await res.json()).toEqual({ error: { code: 'rate_limited', message: 'slow down' } });
  });

  it('answers anything else as a 500 without internals', async () => {
    const original = console.error;
    console.error = () => {};
    try {
      const res = errorResponse(new Error('secret stack detail'));
      expect(res.status).toBe(500);
      expect(JSON.stringify(await res.json())).not.toContain('secret');
    } finally {
      console.error = original;
    }
  });
});
