// The command line reads DXF and SVG directly (check, solve, convert, …) and writes them (convert), with
// --layer, --stroke and --snap saying how to read a drawing.
import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Drawing from 'dxf-writer';
import { main } from '../cli/main';
import { nodeIo, type Io } from '../cli/io';
import { loadPatternText } from '../solver/formats/project';

function run(args: string[]) {
  let out = '';
  let err = '';
  const io: Io = { ...nodeIo(), stdout: (t) => { out += t; }, stderr: (t) => { err += t; }, stderrIsTTY: false };
  return main(args, io).then((code) => ({ code, out, err }));
}

const dir = mkdtempSync(join(tmpdir(), 'hingeplan-cli-drawings-'));
const FIXTURES = join(__dirname, 'fixtures', 'drawings');
const couponDxf = join(dir, 'coupon.dxf');
const couponSvg = join(dir, 'coupon.svg');
copyFileSync(join(FIXTURES, 'coupon-r12.dxf'), couponDxf);
copyFileSync(join(FIXTURES, 'coupon.svg'), couponSvg);

/** A square sheet with one valley diagonal and one mountain diagonal, on layers of the given names and colours. */
function crossDxf(layers: [string, number][], gap = 0): string {
  const d = new Drawing();
  d.setUnits('Millimeters');
  d.addLayer('rim', Drawing.ACI.WHITE, 'CONTINUOUS');
  for (const [name, colour] of layers) d.addLayer(name, colour, 'CONTINUOUS');
  d.setActiveLayer('rim');
  d.drawPolyline([[0, 0], [100, 0], [100, 100], [0, 100]], true);
  d.setActiveLayer(layers[0][0]);
  d.drawLine(0, 0, 50, 50);
  d.drawLine(50, 50, 100, 100);
  d.setActiveLayer(layers[1][0]);
  d.drawLine(100, 0, 50 + gap, 50);
  d.drawLine(50, 50, 0, 100);
  return d.toDxfString();
}

describe('hingeplan reads drawings', () => {
  it('check reads a DXF directly and reports the cleaning', async () => {
    const r = await run(['check', couponDxf, '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.valid).toBe(true);
    expect(j.interiorVertices).toBe(1);
    expect(j.panels).toBe(4);
    expect(j.assignments).toEqual({ B: 8, V: 1, M: 3 });
    const codes = j.messages.map((m: { code: string }) => m.code);
    for (const c of ['drawing-read', 't-junctions-split', 'duplicates-dropped', 'zero-length-dropped', 'collinear-joined', 'ends-trimmed']) expect(codes).toContain(c);
    expect(j.cleaning).toMatchObject({ segments: 11, duplicates: 1, zeroLength: 1, endsTrimmed: 2, collinearJoined: 1, crossings: 0, edges: 12, vertices: 9 });
    expect(j.cleaning.snap).toBeCloseTo(1e-4 * Math.hypot(100, 100), 6); // the overshoot widens the box a little
    const text = await run(['check', couponDxf]);
    expect(text.code).toBe(0);
    expect(text.out).toMatch(/info\[duplicates-dropped\]: Dropped 1 line drawn twice/);
  });

  it('solve reads an SVG directly; the drawing has no labels, so creases are referred to by index', async () => {
    const j = JSON.parse((await run(['check', couponSvg, '--json'])).out);
    expect(j.valid).toBe(true);
    const p = loadPatternText(readFileSync(couponSvg, 'utf8'), couponSvg).pattern!;
    const valley = p.creases.find((c) => c.assignment === 'V')!.index;
    const r = await run(['solve', couponSvg, '--set', `${valley}=45`, '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.out);
    expect(s.status).toBe('several-solutions');
    expect(s.solutions).toHaveLength(2);
  });

  it('--layer names the assignment of layers whose names say none', async () => {
    const file = join(dir, 'plain-layers.dxf');
    writeFileSync(file, crossDxf([['A-1', Drawing.ACI.RED], ['A-2', Drawing.ACI.BLUE]]));
    const plain = JSON.parse((await run(['check', file, '--json'])).out);
    expect(plain.valid).toBe(true);
    expect(plain.assignments.U).toBe(4);
    expect(plain.messages.filter((m: { code: string }) => m.code === 'layer-unassigned').map((m: { text: string }) => m.text.match(/layer "([^"]+)"/)![1]).sort()).toEqual(['A-1', 'A-2']);
    const named = JSON.parse((await run(['check', file, '--json', '--layer', 'a-1=V', '--layer=A-2=M'])).out);
    expect(named.assignments).toEqual({ B: 4, V: 2, M: 2 });
    expect(named.messages.some((m: { code: string }) => m.code === 'layer-unassigned')).toBe(false);
  });

  it('--stroke maps colours (CSS names or DXF colour numbers) to assignments; --layer wins over it', async () => {
    const file = join(dir, 'coloured.dxf');
    writeFileSync(file, crossDxf([['first', Drawing.ACI.RED], ['second', Drawing.ACI.BLUE]]));
    const j = JSON.parse((await run(['check', file, '--json', '--stroke', 'red=V', '--stroke', '5=M'])).out);
    expect(j.assignments).toEqual({ B: 4, V: 2, M: 2 });
    const k = JSON.parse((await run(['check', file, '--json', '--stroke', '#ff0000=V', '--stroke', 'blue=M', '--layer', 'first=M'])).out);
    expect(k.assignments).toEqual({ B: 4, M: 4 });
  });

  it('--snap closes a gap the default snap leaves open', async () => {
    const file = join(dir, 'gap.dxf');
    writeFileSync(file, crossDxf([['valley', Drawing.ACI.RED], ['mountain', Drawing.ACI.BLUE]], 0.05));
    const refused = await run(['check', file]);
    expect(refused.code).toBe(2);
    expect(refused.err).toMatch(/dangling-crease|creases-cross|duplicate/);
    const ok = await run(['check', file, '--snap', '0.1', '--json']);
    expect(ok.code).toBe(0);
    expect(JSON.parse(ok.out).interiorVertices).toBe(1);
  });

  it('convert writes DXF and SVG, and reads them back to the same pattern', async () => {
    const project = join(dir, 'coupon.hingeplan.json');
    expect((await run(['new', 'vertex', '--sectors', '60,100,120,80', '--out', project])).code).toBe(0);
    const dxf = join(dir, 'out.dxf');
    const svg = join(dir, 'out.svg');
    expect((await run(['convert', project, dxf])).code).toBe(0);
    expect((await run(['convert', dxf, svg])).code).toBe(0);
    const back = join(dir, 'back.hingeplan.json');
    const r = await run(['convert', svg, back]);
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/wrote .*back\.hingeplan\.json \(project: /);
    const original = JSON.parse(readFileSync(project, 'utf8'));
    const again = JSON.parse(readFileSync(back, 'utf8'));
    expect(again.creases.map((c: { label: string; assignment: string }) => `${c.label}:${c.assignment}`).sort()).toEqual(
      original.creases.map((c: { label: string; assignment: string }) => `${c.label}:${c.assignment}`).sort(),
    );
    expect(readFileSync(dxf, 'utf8')).toMatch(/\r\nmountain\r\n/);
  });

  it('documents the drawing options in the help of commands that load a pattern, and refuses bad ones', async () => {
    for (const c of ['check', 'solve', 'convert', 'sweep', 'table']) {
      const h = await run([c, '--help']);
      expect(h.out).toMatch(/--layer <name>=<M\|V\|F\|B\|U>/);
      expect(h.out).toMatch(/--stroke <colour>=/);
      expect(h.out).toMatch(/--snap <length>/);
    }
    expect((await run(['new', '--help'])).out).not.toMatch(/--snap/);
    const bad = await run(['check', couponDxf, '--layer', 'valley=Q']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/--layer valley=Q: "Q" is not an assignment/);
    expect((await run(['check', couponDxf, '--stroke', 'reddish=M'])).err).toMatch(/"reddish" is not a colour/);
    expect((await run(['check', couponDxf, '--snap', '-1'])).code).toBe(2);
    expect((await run(['convert', couponDxf, join(dir, 'x.png')])).err).toMatch(/use \.json, \.fold, \.dxf or \.svg/);
  });
});
