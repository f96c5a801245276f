// Oversized requests are refused by the solver core before anything is allocated, as messages that name
// the field and the limit (the command line and the app's worker call the same functions); profile
// parameters that do not apply, or that cannot be computed, are refused too.
import { describe, expect, it } from 'vitest';
import { driveProfile, parseScheduleCsv, scheduleSteps, timeRows } from '../solver/outputs/schedule';
import { gridSteps } from '../solver/outputs/grid';
import { runSteps, sampleDegrees, sampleValues, sweep } from '../solver/paths/sweep';
import { MAX_TABLE_VALUES, ROW_OVERHEAD, maxRows, tableWork } from '../solver/paths/request-limits';
import { buildPattern } from '../solver/model/pattern';
import { miura } from '../solver/model/generators';
import { directionsFromSectors, vertexPattern } from './support/vertex';

const D = Math.PI / 180;
const coupon = vertexPattern(directionsFromSectors([60, 100, 120, 80]), ['V', 'M', 'M', 'M']);
const n = coupon.creases.length;

/** Heap growth over a call, MiB: a refusal must not allocate the rows it refuses. */
function heapGrowth(f: () => unknown): { value: unknown; mib: number } {
  const before = process.memoryUsage().heapUsed;
  const value = f();
  return { value, mib: (process.memoryUsage().heapUsed - before) / 1048576 };
}

describe('the table limit counts rows × creases', () => {
  it('the arithmetic of the limit', () => {
    expect(tableWork(10, 8)).toBe(10 * (8 + ROW_OVERHEAD));
    expect(tableWork(maxRows(8), 8)).toBeLessThanOrEqual(MAX_TABLE_VALUES);
    expect(tableWork(maxRows(8) + 1, 8)).toBeGreaterThan(MAX_TABLE_VALUES);
  });

  it('schedule time rows: --dt 1e-12 over 8 s and --rows 1e9 are refused without allocating, naming the field and the limit', () => {
    const dt = heapGrowth(() => timeRows(8, 1e-12, undefined, n));
    const m = (dt.value as ReturnType<typeof timeRows>).message!;
    expect(m.code).toBe('too-many-rows');
    expect(m.where!.field).toBe('dt');
    // 8 s / 1e-12 s = 8e12 intervals, so 8e12 + 1 rows (independent count)
    expect(m.text).toMatch(/8\.00e\+12 time rows/);
    expect(m.text).toContain(`at most ${Math.floor(MAX_TABLE_VALUES / (n + ROW_OVERHEAD))} time rows`);
    expect(dt.mib).toBeLessThan(8);
    const rows = timeRows(8, undefined, 1e9, n).message!;
    expect(rows.code).toBe('too-many-rows');
    expect(rows.where!.field).toBe('rows');
    // a row count the limit allows is made, ends at T exactly
    const ok = timeRows(8, undefined, maxRows(n), n).times!;
    expect(ok).toHaveLength(maxRows(n));
    expect(ok[ok.length - 1]).toBe(8);
  });

  it('schedule steps refuse the same request as a value (never a throw), before solving anything', () => {
    const r = runSteps(scheduleSteps(coupon, { drive: 0, profile: { kind: 'trapezoid', from: 0, to: 90 * D, duration: 8 }, dt: 1e-12 }));
    expect(r.status).toBe('failed');
    expect(r.messages[0].code).toBe('too-many-rows');
    expect(r.rows).toHaveLength(0);
  });

  it('sweep samples: a step of 1e-9° is refused before the sample list is made; the limit scales with the creases', () => {
    const tiny = heapGrowth(() => sampleDegrees(0, 170, 1e-9, n));
    expect((tiny.value as ReturnType<typeof sampleDegrees>).message!.code).toBe('too-many-samples');
    expect(tiny.mib).toBeLessThan(8);
    expect(sampleValues(0, 170 * D, 1e-9 * D, n).message!.where!.field).toBe('step');
    // a 40 × 40 Miura sheet (12,960 creases) at 0.01° over 178° asks for 17,801 samples: refused, with a step that fits
    const creases = 12_960;
    const big = sampleDegrees(1, 179, 0.01, creases).message!;
    expect(big.text).toMatch(/17801 samples × 12960 creases/);
    const suggested = Number(/at least ([\d.]+)°/.exec(big.text)![1]);
    expect(sampleDegrees(1, 179, suggested, creases).values).toBeDefined();
    // the sweep itself refuses a step that is too fine, as a failed result with the message
    const r = sweep(coupon, { drive: 0, from: 0, to: 170 * D, step: 1e-9 * D });
    expect(r.status).toBe('failed');
    expect(r.messages.some((m) => m.code === 'too-many-samples')).toBe(true);
  });

  it('sampleDegrees: the values a person asked for, in degrees, the end included (decimal steps stay decimal)', () => {
    expect(sampleDegrees(0, 1, 0.1).values).toEqual([0, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1]);
    expect(sampleDegrees(10, 0, 4).values).toEqual([10, 6, 2, 0]);
    expect(sampleDegrees(0, 200, 1).message!.code).toBe('drive-out-of-range');
    expect(sampleDegrees(0, 10, 0).message!.code).toBe('bad-step');
  });

  it('grid nodes: two fine ranges are refused by their product before any node is made', () => {
    const values = Array.from({ length: 5000 }, (_, i) => (i / 100) * D);
    const r = heapGrowth(() => runSteps(gridSteps(coupon, { x: { drive: 0, values }, y: { drive: 1, values } })));
    const g = r.value as ReturnType<typeof runSteps<ReturnType<typeof gridSteps> extends Generator<void, infer T> ? T : never>>;
    expect(g.status).toBe('failed');
    expect(g.messages[0].code).toBe('too-many-nodes');
    expect(g.messages[0].where!.field).toBe('range');
    expect(r.mib).toBeLessThan(16);
  });

  it('a supplied schedule is counted by its lines before they are read', () => {
    const big = miura({ rows: 40, cols: 40, a: 40, b: 30, alphaDeg: 70 });
    const sheet = buildPattern(big.project!.source).pattern!;
    const lines = maxRows(sheet.creases.length) + 10;
    const text = 'time,' + big.project!.drives[0].crease + '\n' + Array.from({ length: lines }, (_, i) => `${i},1`).join('\n');
    const r = parseScheduleCsv(sheet, text);
    expect(r.messages[0].code).toBe('too-many-rows');
    expect(r.rows).toHaveLength(0);
  });
});

describe('profile parameters', () => {
  it('an option the profile does not use is refused, not recorded as if it applied', () => {
    const base = { from: 0, to: 90 * D, duration: 4 };
    expect(driveProfile({ ...base, kind: 'constant', accelTime: 1 }).message!.where!.field).toBe('accelTime');
    expect(driveProfile({ ...base, kind: 'constant', acceleration: 1 }).message!.where!.field).toBe('acceleration');
    expect(driveProfile({ ...base, kind: 'constant', jerkTime: 0.1 }).message!.where!.field).toBe('jerkTime');
    expect(driveProfile({ ...base, kind: 'trapezoid', jerkTime: 0.1 }).message!.where!.field).toBe('jerkTime');
    expect(driveProfile({ ...base, kind: 's-curve', acceleration: 100 * D }).message!.where!.field).toBe('acceleration');
    expect(driveProfile({ ...base, kind: 'trapezoid', accelTime: 1, acceleration: 100 * D }).message).toBeDefined();
  });

  it('a duration too short to compute is refused naming the duration, never NaN positions', () => {
    for (const kind of ['constant', 'trapezoid', 's-curve'] as const) {
      const r = driveProfile({ kind, from: 0, to: 120 * D, duration: 1e-300 });
      expect(r.message?.where?.field, kind).toBe('duration');
      expect(r.message!.code).toBe('bad-profile');
    }
    // a short but computable duration is fine: v_max = Δ/(T − t_a) with t_a = T/4 (common practice for trapezoids)
    const p = driveProfile({ kind: 'trapezoid', from: 0, to: 120 * D, duration: 1e-3 }).profile!;
    expect(p.peakVelocity).toBeCloseTo((120 * D) / (0.75e-3), 6);
  });

  it('a negative acceleration is reported in degrees per second², as the person gave it', () => {
    const m = driveProfile({ kind: 'trapezoid', from: 0, to: 90 * D, duration: 4, acceleration: -1 * D }).message!;
    expect(m.where!.field).toBe('acceleration');
    expect(m.text).toMatch(/-1°\/s²/);
  });
});
