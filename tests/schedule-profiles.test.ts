// Drive profiles and deployment schedules.
import { describe, expect, it } from 'vitest';
import { deploymentSchedule, driveProfile, followSchedule, parseScheduleCsv, timeRows } from '../solver/outputs/schedule';
import { sweep } from '../solver/paths/sweep';
import { miura } from '../solver/model/generators';
import { buildPattern } from '../solver/model/pattern';
import { directionsFromSectors, vertexPattern } from './support/vertex';

const D = Math.PI / 180;

describe('trapezoidal velocity profile: the closed form (common practice for point-to-point moves)', () => {
  // distance Δ in time T with acceleration phases t_a: v_max = Δ/(T − t_a), a = v_max/t_a;
  // x(t) = ½at² (t ≤ t_a), x(t_a)/… cruise at v_max, and the mirror image while stopping
  const from = 10 * D, to = 130 * D, T = 6, ta = 1.5;
  const p = driveProfile({ kind: 'trapezoid', from, to, duration: T, accelTime: ta }).profile!;
  const vmax = (to - from) / (T - ta), a = vmax / ta;
  it('position, velocity and acceleration at every time', () => {
    for (let t = 0; t <= T + 1e-12; t += 0.05) {
      const s = p.at(t);
      let x: number, v: number, ac: number;
      if (t <= ta) { x = 0.5 * a * t * t; v = a * t; ac = a; }
      else if (t <= T - ta) { x = 0.5 * a * ta * ta + vmax * (t - ta); v = vmax; ac = 0; }
      else { const r = T - t; x = to - from - 0.5 * a * r * r; v = a * r; ac = -a; }
      expect(Math.abs(s.position - (from + x))).toBeLessThan(1e-12);
      expect(Math.abs(s.velocity - v)).toBeLessThan(1e-12);
      if (Math.abs(t - ta) > 1e-9 && Math.abs(t - (T - ta)) > 1e-9) expect(Math.abs(s.acceleration - ac)).toBeLessThan(1e-12);
    }
    expect(p.at(T).position).toBeCloseTo(to, 14);
  });

  it('given an acceleration instead: t_a = (T − √(T² − 4Δ/a))/2, refused below 4Δ/T²', () => {
    const A = 60 * D;
    const q = driveProfile({ kind: 'trapezoid', from: 0, to: 90 * D, duration: 5, acceleration: A }).profile!;
    expect(q.accelTime).toBeCloseTo((5 - Math.sqrt(25 - (4 * 90 * D) / A)) / 2, 14);
    expect(q.peakAcceleration).toBeCloseTo(A, 12);
    const bad = driveProfile({ kind: 'trapezoid', from: 0, to: 90 * D, duration: 5, acceleration: 10 * D });
    expect(bad.profile).toBeUndefined();
    expect(bad.message!.text).toMatch(/needs at least 14\.4/);
  });

  it('S-curve: continuous acceleration, and velocity and acceleration are the derivatives of position', () => {
    const s = driveProfile({ kind: 's-curve', from: -20 * D, to: 100 * D, duration: 8, accelTime: 2, jerkTime: 0.5 }).profile!;
    const h = 1e-6;
    let prevA = 0;
    for (let t = h; t < 8 - h; t += 0.01) {
      const lo = s.at(t - h), mid = s.at(t), hi = s.at(t + h);
      expect(Math.abs((hi.position - lo.position) / (2 * h) - mid.velocity)).toBeLessThan(1e-7);
      expect(Math.abs((hi.velocity - lo.velocity) / (2 * h) - mid.acceleration)).toBeLessThan(1e-6);
      expect(Math.abs(mid.acceleration - prevA)).toBeLessThan(0.02); // no jumps: jerk-limited
      prevA = mid.acceleration;
    }
    expect(s.at(8).position).toBeCloseTo(100 * D, 13);
    expect(s.at(8).velocity).toBe(0);
    // peak acceleration v_max/(t_a − t_j)
    expect(s.peakAcceleration).toBeCloseTo((120 * D) / (8 - 2) / (2 - 0.5), 13);
  });

  it('constant rate and bad parameters', () => {
    const c = driveProfile({ kind: 'constant', from: 0, to: 60 * D, duration: 3 }).profile!;
    expect(c.at(1.5).position).toBeCloseTo(30 * D, 14);
    expect(c.at(2).velocity).toBeCloseTo(20 * D, 14);
    expect(driveProfile({ kind: 'trapezoid', from: 0, to: 1, duration: 2, accelTime: 1.5 }).message!.where!.field).toBe('accelTime');
    expect(driveProfile({ kind: 's-curve', from: 0, to: 1, duration: 2, accelTime: 0.5, jerkTime: 0.4 }).message!.where!.field).toBe('jerkTime');
    expect(driveProfile({ kind: 'constant', from: 0, to: 1, duration: 0 }).message!.where!.field).toBe('duration');
    expect(timeRows(2, 0.3).times).toEqual([0, 0.3, 0.6, 0.8999999999999999, 1.2, 1.5, 1.7999999999999998, 2]);
  });
});

describe('deployment schedule of a Miura sheet', () => {
  const g = miura({ rows: 2, cols: 3, a: 40, b: 30, alphaDeg: 65 });
  const pattern = buildPattern(g.project!.source).pattern!;
  const drive = pattern.labelIndex.get(g.project!.drives[0].crease)!;
  const sign = Math.sign(g.project!.drives[0].angleDeg);

  it('drive columns follow the trapezoid; hinge velocities equal rate × drive velocity and match finite differences', () => {
    const profile = { kind: 'trapezoid' as const, from: sign * 5 * D, to: sign * 160 * D, duration: 10, accelTime: 2 };
    const r = deploymentSchedule(pattern, { drive, profile, dt: 0.001 * 50 });
    expect(r.status).toBe('complete');
    const prof = driveProfile(profile).profile!;
    const path = sweep(pattern, { drive, from: profile.from, to: profile.to, samples: r.rows.map((x) => x.drive), curvature: true });
    for (const [k, row] of r.rows.entries()) {
      const st = prof.at(row.t);
      expect(row.drive).toBe(st.position);
      expect(row.driveVelocity).toBe(st.velocity);
      expect(row.driveAcceleration).toBe(st.acceleration);
      const s = path.samples[k];
      for (const c of pattern.creases) {
        if (c.assignment === 'B') continue;
        expect(Math.abs(row.velocities![c.index] - s.rates[c.index] * st.velocity)).toBeLessThan(1e-12);
        expect(Math.abs(row.angles![c.index] - s.angles[c.index])).toBeLessThan(1e-12);
      }
    }
    // independent of the rates: central differences of the solved angles in time (every 0.05 s)
    for (let k = 1; k < r.rows.length - 1; k++) {
      const lo = r.rows[k - 1], mid = r.rows[k], hi = r.rows[k + 1];
      if (Math.abs(mid.t - 2) < 0.06 || Math.abs(mid.t - 8) < 0.06) continue; // acceleration steps at the phase changes
      for (const c of pattern.creases) {
        if (c.assignment === 'B') continue;
        const fd = (hi.angles![c.index] - lo.angles![c.index]) / (hi.t - lo.t);
        const fd2 = (hi.angles![c.index] - 2 * mid.angles![c.index] + lo.angles![c.index]) / ((hi.t - mid.t) ** 2);
        expect(Math.abs(mid.velocities![c.index] - fd), `velocity ${c.label} at ${mid.t}`).toBeLessThan(2e-4);
        expect(Math.abs(mid.accelerations![c.index] - fd2), `acceleration ${c.label} at ${mid.t}`).toBeLessThan(2e-3);
      }
    }
  });

  it('flags every hinge over a rate limit, per hinge and globally', () => {
    const profile = { kind: 's-curve' as const, from: sign * 1 * D, to: sign * 170 * D, duration: 4 };
    const straight = pattern.creases.find((c) => c.label.startsWith('s') && c.assignment !== 'B')!;
    const r = deploymentSchedule(pattern, { drive, profile, rows: 81, limits: { maxRate: 200 * D }, hingeLimits: new Map([[straight.index, { maxRate: 30 * D }]]) });
    const h = r.hinges.find((x) => x.crease === straight.index)!;
    expect(h.rowsOverRate).toBeGreaterThan(0);
    for (const row of r.rows) {
      const over = Math.abs(row.velocities![straight.index]) > 30 * D;
      expect(row.overRate.includes(straight.index)).toBe(over);
      for (const c of row.overRate) if (c !== straight.index) expect(Math.abs(row.velocities![c])).toBeGreaterThan(200 * D);
    }
    expect(r.messages.some((m) => m.code === 'over-limit')).toBe(true);
  });
});

describe('following a supplied schedule', () => {
  it('a row beyond the reach of the drive is flagged and every other row is solved', () => {
    // generic vertex: on branch 1 the drive c0 turns back at about 155.28° (tests/path-events.test.ts)
    const p = vertexPattern(directionsFromSectors([100, 95, 70, 95]));
    const parsed = parseScheduleCsv(p, '# deploy, overshoot, retract\ntime,c0\n0,0\n2,40\n4,80\n6,120\n8,150\n9,160\n10,130\n12,70\n14,10\n');
    expect(parsed.messages).toEqual([]);
    const r = followSchedule(p, parsed, { branch: 1 });
    expect(r.status).toBe('partial');
    const flagged = r.rows.filter((x) => x.unreachable);
    expect(flagged.map((x) => x.time)).toEqual([9]);
    expect(flagged[0].unreachable).toMatch(/Turning point/);
    expect(flagged[0].unreachable).toMatch(/no state at all/);
    for (const row of r.rows.filter((x) => !x.unreachable)) {
      expect(row.angles![0]).toBeCloseTo(row.values.get(0)!, 12);
      expect(row.maxResidual).toBeLessThanOrEqual(1e-10);
    }
    // retracing: the state at 130° on the way back is the one the sweep up passes
    const up = sweep(p, { drive: 0, from: 130 * D, to: 130 * D, samples: [130 * D], start: r.rows[4].angles! });
    expect(Math.abs(up.samples[0].angles[1] - r.rows[6].angles![1])).toBeLessThan(1e-9);
  });

  it('several drives moving together: row to row by homotopy', () => {
    const p = vertexPattern(directionsFromSectors([70, 80, 65, 75, 70]));
    const parsed = parseScheduleCsv(p, 'time,c0,c2\n0,10,-5\n1,20,-10\n2,30,-15\n3,40,-25\n');
    const r = followSchedule(p, parsed);
    expect(r.status).toBe('complete');
    for (const row of r.rows) {
      expect(row.angles![0]).toBeCloseTo(row.values.get(0)!, 12);
      expect(row.angles![2]).toBeCloseTo(row.values.get(2)!, 12);
    }
  });

  it('a malformed schedule names the line', () => {
    const p = vertexPattern(directionsFromSectors([90, 90, 90, 90]));
    const bad = parseScheduleCsv(p, 'time,c0,cX\n0,0,0\n1,10\n2,x,3\n1,5,5\n0.5,1,1\n3,190,0\n');
    expect(bad.messages.map((m) => [m.code, m.where?.line])).toEqual([['unknown-crease', 1], ['schedule-row', 3], ['schedule-row', 4], ['schedule-order', 6], ['schedule-row', 7]]);
  });
});
