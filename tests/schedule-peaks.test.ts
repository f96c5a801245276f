// What reaches the actuator team: hinge velocity and acceleration limits hold between rows too, rows a hair
// from flat lie on the branch, grids reach their flat node, follow says which branch it followed. Checked
// against the published closed form of a flat-foldable degree-4 vertex (T. Evans, R. Lang, S. Magleby,
// L. Howell, "Rigidly foldable origami gadgets and tessellations", R. Soc. Open Sci. 2:150067, 2015; also
// T. Tachi, J. IASS 50(3), 2009): tan(ρ1/2) = k·tan(ρ0/2) on each mode.
import { describe, expect, it } from 'vitest';
import { deploymentSchedule, driveProfile, followSchedule, parseScheduleCsv } from '../solver/outputs/schedule';
import { gridSweep } from '../solver/outputs/grid';
import { waterbomb } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { degree4Assignment } from '../solver/model/generators';
import { directionsFromSectors, vertexPattern } from './support/vertex';

const D = Math.PI / 180;
const SECTORS = [60, 100, 120, 80];

/** ρ1(ρ0) = 2 atan(k tan(ρ0/2)) and its first two derivatives (closed form, differentiated by hand). */
function modeOf(k: number) {
  const rho = (x: number) => 2 * Math.atan(k * Math.tan(x / 2));
  const rate = (x: number) => { const t = Math.tan(x / 2); return (k * (1 + t * t)) / (1 + k * k * t * t); };
  const curv = (x: number) => { const t = Math.tan(x / 2); return (k * (1 + t * t) * t * (1 - k * k)) / (1 + k * k * t * t) ** 2; };
  return { rho, rate, curv };
}

function coupon() {
  return vertexPattern(directionsFromSectors(SECTORS), degree4Assignment(SECTORS));
}

describe('schedule limits between rows', () => {
  it('a trapezoid whose hinge peaks at the end of the acceleration phase: the peak is found whatever the rows', () => {
    const p = coupon();
    const spec = { kind: 'trapezoid' as const, from: 0, to: 45 * D, duration: 3 };
    const prof = driveProfile(spec).profile!;
    for (const rows of [6, 11]) {
      const r = deploymentSchedule(p, { drive: 0, profile: spec, rows, limits: { maxRate: 30 * D } });
      // the mode followed: |ρ1/ρ0| at the first row past flat gives k
      const row = r.rows.find((x) => x.angles && x.drive > 0)!;
      const k = Math.tan(Math.abs(row.angles![1]) / 2) / Math.tan(row.drive / 2);
      const m = modeOf(k);
      // reference peak of |ρ̇1| = |r(θ(t))·θ̇(t)| on a fine grid of the profile, from the closed form
      let peak = 0, at = 0;
      for (let i = 0; i <= 200_000; i++) {
        const t = (3 * i) / 200_000;
        const st = prof.at(t);
        const v = Math.abs(m.rate(st.position) * st.velocity);
        if (v > peak) { peak = v; at = t; }
      }
      const h = r.hinges.find((x) => x.crease === 1)!;
      expect(Math.abs(h.peakRate - peak) / peak).toBeLessThan(1e-6);
      expect(Math.abs(h.peakRateAt - at)).toBeLessThan(1e-3);
      expect(h.rowsOverRate + (h.overBetweenRows ? 1 : 0)).toBeGreaterThan(0);
    }
  });

  it('a hinge over its limit only between rows is flagged and said so', () => {
    const p = coupon();
    const spec = { kind: 'trapezoid' as const, from: 0, to: 45 * D, duration: 3 };
    // with 3 rows (0, 1.5, 3 s) no row sits near the end of the acceleration phase
    const r = deploymentSchedule(p, { drive: 0, profile: spec, rows: 3, limits: { maxRate: 55 * D } });
    const h = r.hinges.find((x) => x.crease === 1)!;
    expect(h.rowsOverRate).toBe(0);
    expect(h.overBetweenRows).toBe(true);
    expect(r.messages.some((m) => m.code === 'over-limit-between-rows')).toBe(true);
  });
});

describe('rows a hair from flat lie on the branch', () => {
  for (const method of ['propagate', 'continue'] as const) {
    it(`an S-curve from flat: every row's angle, velocity and acceleration match the closed form (${method})`, () => {
      const p = coupon();
      // a slow start: the first rows are within 1e-6° of flat
      const spec = { kind: 's-curve' as const, from: 0, to: 60 * D, duration: 20 };
      const r = deploymentSchedule(p, { drive: 0, profile: spec, dt: 0.01, limits: {}, method });
      expect(r.status).toBe('complete');
      const tiny = r.rows.filter((x) => x.drive > 0 && x.drive < 1e-6 * D);
      expect(tiny.length).toBeGreaterThan(0);
      const ref = r.rows.find((x) => x.drive > 10 * D)!;
      const k = Math.tan(Math.abs(ref.angles![1]) / 2) / Math.tan(ref.drive / 2);
      const m = modeOf(k);
      const sign = Math.sign(ref.angles![1]);
      let peakAcc = 0;
      for (const x of r.rows) peakAcc = Math.max(peakAcc, Math.abs(m.rate(x.drive) * x.driveAcceleration + m.curv(x.drive) * x.driveVelocity ** 2));
      for (const x of r.rows) {
        if (!x.angles) continue;
        const want = sign * m.rho(x.drive);
        expect(Math.abs(x.angles[1] - want)).toBeLessThan(1e-9 * Math.max(1, x.drive) + 1e-14);
        const vel = sign * m.rate(x.drive) * x.driveVelocity;
        const acc = sign * (m.rate(x.drive) * x.driveAcceleration + m.curv(x.drive) * x.driveVelocity ** 2);
        expect(Math.abs(x.velocities![1] - vel)).toBeLessThan(1e-8);
        // relative to the peak acceleration (the rows near flat were off by a third of it)
        expect(Math.abs(x.accelerations![1] - acc) / peakAcc).toBeLessThan(1e-6);
      }
    });
  }
});

describe('grids and follow', () => {
  it('a grid over the gripper with the flat state as a node reaches every node, flat included', () => {
    const { pattern } = buildPattern(waterbomb({ size: 80 }).project!.source);
    const d0 = pattern!.labelIndex.get('d0')!, d1 = pattern!.labelIndex.get('d1')!, d2 = pattern!.labelIndex.get('d2')!;
    const g = gridSweep(pattern!, { x: { drive: d0, values: [0, 30 * D, 60 * D] }, y: { drive: d1, values: [0, 30 * D, 60 * D] }, holds: [{ crease: d2, value: 0 }] });
    expect(g.status).toBe('complete');
    const flat = g.nodes[0][0];
    expect(flat.angles).toBeDefined();
    expect(Math.max(...Array.from(flat.angles!, Math.abs))).toBe(0);
    for (const row of g.nodes) for (const n of row) expect(n.maxResidual!).toBeLessThanOrEqual(1e-10);
  });

  it('follow records the branch it followed', () => {
    const p = coupon();
    const csv = 'time,c0\n0,0\n1,20\n2,40\n';
    const schedule = parseScheduleCsv(p, csv);
    const r = followSchedule(p, schedule);
    expect(r.status).toBe('complete');
    expect(r.branch).toBeDefined();
    expect(r.branch!.name).toMatch(/^[A-Z]+[+-]$/);
  });
});
