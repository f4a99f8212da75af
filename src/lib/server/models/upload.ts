/**
 * Reading uploaded files in API routes: raw bodies (Content-Type text/csv or application/json) or a
 * multipart form with a `file` field. The body is read through a byte cap, so an oversized upload is
 * refused without being buffered whole; every refusal is a 400 naming the problem.
 */
import { HttpError } from '../http.ts';

export interface Upload {
  readonly text: string;
  readonly filename: string | null;
  /** Other (string) fields of a multipart form. */
  readonly fields: Record<string, string>;
}

const tooLarge = (maxBytes: number) =>
  new HttpError(400, 'file_too_large', `file: larger than the ${Math.round(maxBytes / 1024)} KiB limit`, { field: 'file' });

async function readCapped(request: Request, maxBytes: number): Promise<Uint8Array> {
  const declared = Number(request.headers.get('content-length') ?? '0');
  // A multipart envelope adds a little; allow 16 KiB of headroom for it.
  if (declared > maxBytes + 16 * 1024) throw tooLarge(maxBytes);
  if (!request.body) return new Uint8Array();
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > maxBytes + 16 * 1024) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge(maxBytes);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(size);
  let at = 0;
  for (const c of chunks) { out.set(c, at); at += c.byteLength; }
  return out;
}

function decode(bytes: Uint8Array): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new HttpError(400, 'bad_encoding', 'file: not UTF-8 text', { field: 'file' });
  }
}

/**
 * `accept` lists the raw media types allowed (e.g. ['text/csv']); multipart/form-data with a
 * `file` field is always allowed as well.
 */
export async function readUpload(request: Request, accept: readonly string[], maxBytes: number): Promise<Upload> {
  const type = (request.headers.get('content-type') ?? '').toLowerCase();
  const media = type.split(';')[0].trim();
  if (media === 'multipart/form-data') {
    const bytes = await readCapped(request, maxBytes);
    let form: FormData;
    try {
      form = await new Response(bytes as unknown as BodyInit, { headers: { 'content-type': type } }).formData();
    } catch {
      throw new HttpError(400, 'bad_form', 'body: not a readable multipart form', { field: '(body)' });
    }
    const file = form.get('file');
    if (!file || typeof file === 'string') throw new HttpError(400, 'missing_file', 'file: the form has no file field named "file"', { field: 'file' });
    if (file.size > maxBytes) throw tooLarge(maxBytes);
    const fileType = (file.type || '').toLowerCase().split(';')[0].trim();
    if (fileType && fileType !== 'application/octet-stream' && !accept.includes(fileType) && !(accept.includes('text/csv') && fileType === 'application/vnd.ms-excel')) {
      throw new HttpError(400, 'wrong_content_type', `file: type ${fileType} is not accepted; send ${accept.join(' or ')}`, { field: 'file' });
    }
    const fields: Record<string, string> = {};
    for (const [k, v] of form.entries()) if (typeof v === 'string') fields[k] = v;
    return { text: decode(new Uint8Array(await file.arrayBuffer())), filename: file.name || null, fields };
  }
  if (!accept.includes(media)) {
    throw new HttpError(400, 'wrong_content_type',
      `Content-Type ${media || '(none)'} is not accepted here; send ${accept.join(' or ')}, or multipart/form-data with a "file" field`, { field: 'content-type' });
  }
  const bytes = await readCapped(request, maxBytes);
  if (bytes.byteLength > maxBytes) throw tooLarge(maxBytes);
  return { text: decode(bytes), filename: null, fields: {} };
}
