import { crc32, deflateSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { paperFigure, paperSizeProblem, pixelsPerMetre, readResolution, scriptRuns, SIZE_PRESETS, toPoints, withResolution } from '../../../src/lib/plot/paper';
import { makeTwoLakeBands, makeTwoLakeDiagram } from '../../fixtures/two-lake';

/** A 2 x 1 RGB PNG built by hand (PNG 1.2: signature, IHDR, IDAT with zlib data, IEND), CRCs from Node's zlib. */
function tinyPng(): Uint8Array {
  const chunk = (type: string, data: Uint8Array) => {
    const out = Buffer.alloc(12 + data.length);
    out.writeUInt32BE(data.length, 0);
    out.write(type, 4, 'latin1');
    Buffer.from(data).copy(out, 8);
    out.writeUInt32BE(crc32(out.subarray(4, 8 + data.length)), 8 + data.length);
    return out;
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(2, 0); ihdr.writeUInt32BE(1, 4); ihdr[8] = 8; ihdr[9] = 2;
  const raw = Buffer.from([0, 255, 0, 0, 0, 0, 255]); // filter byte, then two RGB pixels
  return new Uint8Array(Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw)), chunk('IEND', new Uint8Array())]));
}

/** Chunk types in order, each chunk's CRC checked with Node's zlib (independent of the crc-32 package). */
function chunks(png: Uint8Array): string[] {
  const b = Buffer.from(png);
  const types: string[] = [];
  for (let at = 8; at < b.length;) {
    const len = b.readUInt32BE(at);
    types.push(b.toString('latin1', at + 4, at + 8));
    expect(b.readUInt32BE(at + 8 + len)).toBe(crc32(b.subarray(at + 4, at + 8 + len)));
    at += 12 + len;
  }
  return types;
}

describe('paper-sized figures', () => {
  const diagram = makeTwoLakeDiagram({ pointsPerBranch: 100 });
  const input = { diagram, projection: { kind: 'node' as const, index: 0 }, regimes: makeTwoLakeBands(diagram), xLabel: 'coupling β (1/yr)' };

  it('converts lengths to points: 1 in = 72 pt = 25.4 mm (PDF 1.7 §8.3.2.3)', () => {
    expect(toPoints(1, 'in')).toBe(72);
    expect(toPoints(25.4, 'mm')).toBeCloseTo(72, 12);
    expect(toPoints(85, 'mm')).toBeCloseTo((85 / 25.4) * 72, 12);
  });

  it('lays a one-column figure out at its physical width with tick labels at the asked size', () => {
    const size = { ...SIZE_PRESETS['one-column'] };
    const paper = paperFigure(input, size);
    expect(paper.widthPt).toBeCloseTo(toPoints(85, 'mm'), 9);
    // Heights are whole layout units (buildFigure rounds up), so within one unit of the asked height.
    expect(Math.abs(paper.heightPt - toPoints(70, 'mm'))).toBeLessThanOrEqual(paper.scale + 1e-9);
    const ticks = paper.figure.items.filter((p) => p.t === 'text' && p.mono);
    expect(ticks.length).toBeGreaterThan(4);
    for (const t of ticks) expect(t.t === 'text' && t.size * paper.scale).toBeCloseTo(size.fontSize, 12);
    expect(paper.figure.items.some((p) => p.t === 'text' && p.text === 'coupling β (1/yr)')).toBe(true);
  });

  it('says what is wrong with a size, naming the field', () => {
    expect(paperSizeProblem({ width: 85, height: 70, unit: 'mm', fontSize: 7 })).toBeNull();
    expect(paperSizeProblem({ width: 5, height: 70, unit: 'mm', fontSize: 7 })).toMatch(/^width: must be between 20 and 600 mm/);
    expect(paperSizeProblem({ width: 3.3, height: Number.NaN, unit: 'in', fontSize: 7 })).toMatch(/^height:/);
    expect(paperSizeProblem({ width: 85, height: 70, unit: 'mm', fontSize: 40 })).toMatch(/^font size:/);
    expect(paperSizeProblem({ width: 30, height: 70, unit: 'mm', fontSize: 12 })).toMatch(/^width: too narrow/);
  });

  it('records the resolution in a pHYs chunk right after IHDR, replacing an old one, with valid CRCs', () => {
    const png = withResolution(tinyPng(), 600);
    expect(chunks(png)).toEqual(['IHDR', 'pHYs', 'IDAT', 'IEND']);
    // 600 dpi = 600 / 0.0254 = 23622.05 px/m, stored rounded (PNG 1.2 §4.2.4.2).
    expect(pixelsPerMetre(600)).toBe(23622);
    expect(readResolution(png)!.x).toBeCloseTo(600, 1);
    const again = withResolution(png, 300);
    expect(chunks(again)).toEqual(['IHDR', 'pHYs', 'IDAT', 'IEND']);
    expect(readResolution(again)!.y).toBeCloseTo(300, 1);
    expect(readResolution(tinyPng())).toBeNull();
    expect(() => withResolution(new Uint8Array(40), 300)).toThrow(/not a PNG/);
  });

  it('splits text into Greek and other runs', () => {
    expect(scriptRuns('coupling β (1/yr)')).toEqual([{ text: 'coupling ', greek: false }, { text: 'β', greek: true }, { text: ' (1/yr)', greek: false }]);
    expect(scriptRuns('σβ')).toEqual([{ text: 'σβ', greek: true }]);
  });
});
