// Contact and torque on the command line: the JSON and CSV shapes (event, per-sample flags, torque columns,
// header lines), --stop-at contact, --contact off, loads from the file, and solve's per-solution contacts.
import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../cli/main';
import { nodeIo, type Io } from '../cli/io';
import { parseProject, writeProject } from '../solver/formats/project';
import { parseFold, writeFold } from '../solver/formats/fold';
import { STANDARD_GRAVITY } from '../solver/outputs/torque';

const dir = mkdtempSync(join(tmpdir(), 'hingeplan-checks-cli-'));

function run(args: string[]) {
  let out = '';
  let err = '';
  const io: Io = { ...nodeIo(), stdout: (t) => { out += t; }, stderr: (t) => { err += t; }, stderrIsTTY: false };
  return main(args, io).then((code) => ({ code, out, err }));
}

/** The strip of tests/contact.test.ts as a project file: A [−60, 0], B [0, 40] (base), C [40, 90], 20 wide, in mm. */
function stripFile(extra: Record<string, unknown> = {}): string {
  const vertices = [[-60, 0], [0, 0], [40, 0], [90, 0], [90, 20], [40, 20], [0, 20], [-60, 20]];
  const rim = [0, 1, 2, 3, 4, 5, 6, 7].map((v, k, a) => ({ vertices: [v, a[(k + 1) % 8]], assignment: 'B' }));
  const project = {
    format: 'hingeplan-project', version: 1, name: 'strip', units: 'mm', vertices,
    creases: [...rim, { vertices: [1, 6], assignment: 'V', label: 'c1' }, { vertices: [2, 5], assignment: 'V', label: 'c2' }],
    faces: [[0, 1, 6, 7], [1, 2, 5, 6], [2, 3, 4, 5]], basePanel: 1, ...extra,
  };
  const file = join(dir, `strip-${Math.random().toString(36).slice(2)}.hingeplan.json`);
  writeFileSync(file, JSON.stringify(project));
  return file;
}

// first contact of this strip with c2 held at 120°: A sweeps over C's tip (40 + 50 cos 120°, 50 sin 120°) =
// (15, 43.30), at θ = atan2(43.30, −15) = 109.1066° (plane geometry, see tests/contact.test.ts)
const EXPECTED = (Math.atan2(50 * Math.sin((120 * Math.PI) / 180), -(40 + 50 * Math.cos((120 * Math.PI) / 180))) * 180) / Math.PI;
const sweepArgs = (file: string) => ['sweep', file, '--drive', 'c1', '--from', '1', '--to', '179', '--hold', 'c2=120'];

describe('contact on the path commands', () => {
  it('sweep --json: the contact event, "contact": true past it, what was checked', async () => {
    const r = await run([...sweepArgs(stripFile()), '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.contact).toEqual({ checked: true, clearance: 0 });
    const e = j.events.find((x: { type: string }) => x.type === 'contact');
    expect(e.panels).toEqual([0, 2]);
    expect(e.drive).toBeGreaterThanOrEqual(EXPECTED - 1e-6);
    expect(e.drive - EXPECTED).toBeLessThanOrEqual(0.01);
    expect(e.distance).toBe(0);
    expect(e.point).toHaveLength(3);
    expect(e.text).toMatch(/Panels 0 and 2 meet/);
    for (const s of j.samples) {
      if (s.drive >= e.drive) expect(s.contact).toBe(true);
      else expect(s.contact).toBeUndefined();
    }
    expect(j.samples).toHaveLength(179);
  });

  it('--stop-at contact ends the path there (exit 3); --contact off checks nothing', async () => {
    const stopped = await run([...sweepArgs(stripFile()), '--json', '--stop-at', 'contact']);
    expect(stopped.code).toBe(3);
    const j = JSON.parse(stopped.out);
    expect(j.status).toBe('partial');
    expect(j.samples[j.samples.length - 1].drive).toBe(110);
    const off = JSON.parse((await run([...sweepArgs(stripFile()), '--json', '--contact', 'off'])).out);
    expect(off.contact).toEqual({ checked: false, clearance: 0 });
    expect(off.events.some((x: { type: string }) => x.type === 'contact')).toBe(false);
    expect((await run([...sweepArgs(stripFile()), '--contact', 'maybe'])).code).toBe(2);
    expect((await run([...sweepArgs(stripFile()), '--clearance', '-1'])).code).toBe(2);
  });

  it('table CSV: a contact column, the header line, the event after the rows; torque columns with loads', async () => {
    const r = await run(['table', stripFile(), '--drive', 'c1', '--from', '100', '--to', '115', '--hold', 'c2=120', '--areal-density', '3', '--spring', 'c2=0.5:90']);
    expect(r.code).toBe(0);
    const lines = r.out.split('\n');
    expect(lines.find((l) => l.startsWith('# contact:'))).toMatch(/checked at every row, clearance 0 mm; first contact at 109\.1\d* deg, panels 0 and 2/);
    expect(lines.find((l) => l.startsWith('# torque:'))).toMatch(/N·m/);
    const head = lines.find((l) => l.startsWith('drive,'))!.split(',');
    expect(head.slice(-3)).toEqual(['contact', 'torque:c1', 'torque:c2']);
    const rows = lines.filter((l) => /^\d/.test(l)).map((l) => l.split(','));
    const at = (deg: number) => rows.find((x) => Number(x[0]) === deg)!;
    expect(at(109)[head.indexOf('contact')]).toBe('0');
    expect(at(110)[head.indexOf('contact')]).toBe('1');
    // the lifted flap A: m = 3 kg/m² · 0.06 m · 0.02 m, τ = m g (L/2) cos θ (statics, common practice)
    const m = 3 * 0.06 * 0.02;
    expect(Number(at(100)[head.indexOf('torque:c1')])).toBeCloseTo(m * STANDARD_GRAVITY * 0.03 * Math.cos((100 * Math.PI) / 180), 12);
    // the held flap C at 120°: gravity plus the spring, k (θ − θ₀) with θ₀ = 90°
    const mc = 3 * 0.05 * 0.02;
    expect(Number(at(100)[head.indexOf('torque:c2')])).toBeCloseTo(mc * STANDARD_GRAVITY * 0.025 * Math.cos((120 * Math.PI) / 180) + 0.5 * (Math.PI / 6), 12);
    expect(lines.some((l) => l.startsWith('# event: contact at 109.1'))).toBe(true);
  });

  it('loads from the project file; torque needs known units', async () => {
    const file = stripFile({ loads: { arealDensity: 3, springs: [{ crease: 'c2', stiffness: 0.5, rest: 90 }] } });
    const j = JSON.parse((await run(['sweep', file, '--drive', 'c1', '--from', '100', '--to', '102', '--hold', 'c2=120', '--json'])).out);
    expect(j.torqueUnits).toBe('N·m');
    expect(Object.keys(j.samples[0].torque)).toEqual(['c1', 'c2']);
    // |cos θ| grows from 100° to 102°: the peak is at the end
    expect(j.peakTorque.c1.drive).toBe(102);
    const feet = stripFile({ units: 'ft' });
    const r = await run(['sweep', feet, '--drive', 'c1', '--from', '100', '--to', '102', '--hold', 'c2=120', '--areal-density', '1']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/units-unknown.*"ft"/);
  });

  it('solve: every solution carries its contacts', async () => {
    const file = stripFile();
    const hit = JSON.parse((await run(['solve', file, '--set', 'c1=150', '--set', 'c2=120', '--json'])).out);
    expect(hit.contact).toEqual({ checked: true, clearance: 0 });
    expect(hit.solutions[0].contacts).toEqual([[0, 2]]);
    const clear = JSON.parse((await run(['solve', file, '--set', 'c1=60', '--set', 'c2=120', '--json'])).out);
    expect(clear.solutions[0].contacts).toEqual([]);
  });
});

describe('loads in the files', () => {
  it('the project file and FOLD keep the loads through a round trip; bad loads are refused by name', () => {
    const loads = { arealDensity: 2.5, gravity: [0, 0, -9.81], panelMasses: [{ panel: 1, mass: 0.4 }], springs: [{ crease: 'c1', stiffness: 0.2, rest: 45 }] };
    const text = JSON.stringify({
      format: 'hingeplan-project', version: 1, name: 'p', units: 'mm',
      vertices: [[0, 0], [10, 0], [10, 10], [0, 10], [20, 0], [20, 10]],
      creases: [
        { vertices: [0, 1], assignment: 'B' }, { vertices: [1, 2], assignment: 'V', label: 'c1' }, { vertices: [2, 3], assignment: 'B' },
        { vertices: [3, 0], assignment: 'B' }, { vertices: [1, 4], assignment: 'B' }, { vertices: [4, 5], assignment: 'B' }, { vertices: [5, 2], assignment: 'B' },
      ],
      loads,
    });
    const p = parseProject(text);
    expect(p.messages).toEqual([]);
    expect(p.project!.loads).toEqual(loads);
    expect(parseProject(writeProject(p.project!)).project!.loads).toEqual(loads);
    const fold = parseFold(writeFold(p.project!));
    expect(fold.project!.loads).toEqual(loads);
    const bad = parseProject(text.replace('"arealDensity":2.5', '"arealDensty":2.5'));
    expect(bad.project).toBeUndefined();
    expect(bad.messages[0].text).toMatch(/arealDensty/);
    const badFold = parseFold(writeFold(p.project!).replace('"stiffness":0.2', '"stiffness":-1'));
    expect(badFold.project).toBeUndefined();
    expect(badFold.messages[0].where?.field).toBe('hingeplan:loads.springs[0]');
  });
});
