import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { errorResponse, HttpError, json, parseJson, zodToHttpError } from '../../../src/lib/server/http.ts';

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

describe('json(data, status) and parseJson(request) on hostile bodies', () => {
  it('json(data, 404) carries the standard reason phrase, which the Node adapter puts on the status line', () => {
    expect(json({}, 404).statusText).toBe('Not Found');
    expect(json({}, 400).statusText).toBe('Bad Request');
    expect(json(null, 204).statusText).toBe('No Content');
  });

  const post = (text: string) => new Request('http://x/', { method: 'POST', headers: { 'content-type': 'application/json' }, body: text });
  it('parseJson answers 400 naming the field for a body nested 50 000 levels deep, before zod sees it', async () => {
    const err = await parseJson(post(`{"name":${'['.repeat(50_000)}${']'.repeat(50_000)}}`), z.object({ name: z.string() }).strict(), { maxBytes: 1 << 20 }).catch((e) => e);
    expect(err).toBeInstanceOf(HttpError);
    expect(err).toMatchObject({ status: 400, code: 'invalid_input', message: 'name: nested more than 32 levels deep', extra: { field: 'name' } });
  });
  it('parseJson answers 400 naming the field for an escaped lone surrogate', async () => {
    const err = await parseJson(post('{"name":"\\ud800lone"}'), z.object({ name: z.string() }).strict()).catch((e) => e);
    expect(err).toMatchObject({ status: 400, code: 'invalid_input', extra: { field: 'name' } });
    expect(err.message).toMatch(/^name: the text contains a lone UTF-16 surrogate \(U\+D800\)/);
  });
});
