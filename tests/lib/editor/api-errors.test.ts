import { describe, it, expect } from 'vitest';
import { issuesFromErrorBody, normalizeIssuePath } from '../../../src/lib/editor';

describe('normalizeIssuePath', () => {
  it('drops the service\'s "document." prefix and turns dotted indices into brackets', () => {
    expect(normalizeIssuePath('document.nodes[1].parameters.a')).toBe('nodes[1].parameters.a');
    expect(normalizeIssuePath('nodes.1.parameters.a')).toBe('nodes[1].parameters.a');
    expect(normalizeIssuePath('links.0')).toBe('links[0]');
    expect(normalizeIssuePath('element.rate')).toBe('element.rate');
  });
});

describe('issuesFromErrorBody', () => {
  it('reads { error: { issues: [{ field, message }] } } as the foundation sends it', () => {
    const body = { error: { code: 'invalid_input', message: 'x', issues: [{ field: 'document.element.rate', message: "unknown symbol 'c'" }] } };
    expect(issuesFromErrorBody(body)).toEqual([{ path: 'element.rate', message: "unknown symbol 'c'" }]);
  });
  it('also reads details.issues with path keys, and ignores entries without a message', () => {
    const body = { error: { details: { issues: [{ path: 'sweep.to', message: 'must differ' }, { path: 'x' }] } } };
    expect(issuesFromErrorBody(body)).toEqual([{ path: 'sweep.to', message: 'must differ' }]);
  });
  it('gives [] for bodies that are not error bodies', () => {
    for (const b of [null, 'text', { error: 'no' }, { error: { issues: 'no' } }]) expect(issuesFromErrorBody(b)).toEqual([]);
  });
});
