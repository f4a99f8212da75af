/**
 * JSON responses and errors for API routes. Every error leaves as
 *   { "error": { "code": string, "message": string, "field"?: string, "issues"?: [...] } }
 * with a fitting status; unexpected exceptions become a logged 500 without internals.
 */
import type { APIContext, APIRoute } from 'astro';
import { STATUS_CODES } from 'node:http';
import { ZodError, type ZodTypeAny, type z } from 'zod';
import { jsonShapeProblem, problemField } from './json-shape.ts';

export interface ErrorBody {
  error: { code: string; message: string; field?: string; issues?: { field: string; message: string }[] };
}

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly extra: { field?: string; issues?: { field: string; message: string }[]; headers?: Record<string, string> } = {},
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (message: string, field?: string) => new HttpError(400, 'invalid_input', message, { field });
export const unauthorized = (message = 'Sign in first.') => new HttpError(401, 'unauthenticated', message);
export const forbidden = (message = 'Your role in this workspace does not allow this.') => new HttpError(403, 'forbidden', message);
export const notFound = (message = 'Not found.') => new HttpError(404, 'not_found', message);
export const conflict = (message: string) => new HttpError(409, 'conflict', message);
export const tooManyRequests = (message: string, retryAfterSeconds: number) =>
  new HttpError(429, 'rate_limited', message, { headers: { 'Retry-After': String(Math.max(1, Math.ceil(retryAfterSeconds))) } });

/** The standard reason phrase ("Bad Request"); a Response built without one sends an empty status line text. */
export const statusText = (status: number): string => STATUS_CODES[status] ?? '';

export function json(data: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(status === 204 ? null : JSON.stringify(data), {
    status,
    statusText: statusText(status),
    headers: status === 204 ? headers : { 'Content-Type': 'application/json; charset=utf-8', ...headers },
  });
}

export function jsonError(status: number, code: string, message: string, extra: Omit<ErrorBody['error'], 'code' | 'message'> = {}, headers: Record<string, string> = {}): Response {
  return json({ error: { code, message, ...extra } }, status, headers);
}

/** "email", "parameters.0.value", or "(body)" for the top level. */
function fieldName(path: (string | number)[]): string {
  return path.length ? path.join('.') : '(body)';
}

/** Turns zod issues into one readable message that names every offending field. */
export function zodToHttpError(err: ZodError): HttpError {
  const issues: { field: string; message: string }[] = [];
  for (const issue of err.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) {
        issues.push({ field: fieldName([...issue.path, key]), message: `unknown field "${fieldName([...issue.path, key])}"` });
      }
    } else {
      issues.push({ field: fieldName(issue.path), message: `${fieldName(issue.path)}: ${issue.message}` });
    }
  }
  const message = issues.map((i) => i.message).join('; ') || 'invalid input';
  return new HttpError(400, 'invalid_input', message, { field: issues[0]?.field, issues });
}

export function errorResponse(err: unknown): Response {
  if (err instanceof HttpError) {
    const { headers, ...extra } = err.extra;
    return jsonError(err.status, err.code, err.message, extra, headers ?? {});
  }
  if (err instanceof ZodError) return errorResponse(zodToHttpError(err));
  console.error('[brinkmap] unexpected error', err);
  return jsonError(500, 'internal', 'Something went wrong on the server; it has been logged.');
}

/** Wraps an API handler so thrown HttpErrors / ZodErrors become JSON error responses. */
export function handler(fn: (context: APIContext) => Promise<Response> | Response): APIRoute {
  return async (context) => {
    try {
      return await fn(context);
    } catch (err) {
      return errorResponse(err);
    }
  };
}

export interface ParseOptions {
  /** Largest accepted body in bytes (default 64 KiB). */
  maxBytes?: number;
  /** Deepest accepted nesting of arrays and objects (default 32, see json-shape.ts). */
  maxDepth?: number;
}

/** 400 for a body nested too deep or holding a lone surrogate, before anything recursive touches it. */
export function checkJsonShape(value: unknown, options: { maxDepth?: number; prefix?: (string | number)[] } = {}): void {
  const problem = jsonShapeProblem(value, { maxDepth: options.maxDepth });
  if (!problem) return;
  const field = problemField([...(options.prefix ?? []), ...problem.path]);
  throw new HttpError(400, 'invalid_input', `${field}: ${problem.message}`, { field, issues: [{ field, message: problem.message }] });
}

/** Reads a JSON body and validates it with `schema` (use `.strict()` objects). Throws HttpError 400/413/415. */
export async function parseJson<S extends ZodTypeAny>(request: Request, schema: S, options: ParseOptions = {}): Promise<z.infer<S>> {
  const maxBytes = options.maxBytes ?? 64 * 1024;
  const type = request.headers.get('content-type') ?? '';
  if (!type.toLowerCase().includes('application/json')) {
    throw new HttpError(415, 'unsupported_media_type', 'Send the body as JSON with Content-Type: application/json.');
  }
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (declared > maxBytes) throw new HttpError(413, 'payload_too_large', `Body larger than ${maxBytes} bytes.`);
  const text = await request.text();
  if (Buffer.byteLength(text, 'utf8') > maxBytes) throw new HttpError(413, 'payload_too_large', `Body larger than ${maxBytes} bytes.`);
  let data: unknown;
  try {
    data = text.length ? JSON.parse(text) : undefined;
  } catch {
    throw new HttpError(400, 'invalid_json', 'The body is not valid JSON.');
  }
  checkJsonShape(data, { maxDepth: options.maxDepth });
  return parseValue(data, schema);
}

/** Validates an already-read value (query params, form data turned into an object). */
export function parseValue<S extends ZodTypeAny>(value: unknown, schema: S): z.infer<S> {
  const result = schema.safeParse(value);
  if (!result.success) throw zodToHttpError(result.error);
  return result.data;
}

/** Form fields as a plain object (last value wins), for validation with a strict zod schema. */
export async function formObject(request: Request, maxBytes = 64 * 1024): Promise<Record<string, string>> {
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (declared > maxBytes) throw new HttpError(413, 'payload_too_large', `Form larger than ${maxBytes} bytes.`);
  const form = await request.formData();
  const out: Record<string, string> = {};
  for (const [key, value] of form.entries()) {
    if (typeof value === 'string') out[key] = value;
  }
  return out;
}
