/**
 * Refusals from the service code (models, runs, results, reviews) are the foundation's HttpError,
 * so API routes wrapped in `handler()` answer them as JSON errors without translation.
 */
import { HttpError } from '../http.ts';

export { HttpError };
export const notFound = (what: string) => new HttpError(404, 'not_found', `${what} not found`);
export const badRequest = (message: string, issues?: { field: string; message: string }[]) =>
  new HttpError(400, 'invalid_input', message, { field: issues?.[0]?.field, issues });
export const conflict = (message: string) => new HttpError(409, 'conflict', message);
export const forbidden = (message: string) => new HttpError(403, 'forbidden', message);
