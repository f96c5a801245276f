// The tolerance panel's state: answers of an older request are dropped, progress only while running, and the
// hinges charted are the chosen ones, else the selected crease and the widest spreads.
import { describe, expect, it } from 'vitest';
import { initialTolerance, shownHinges, spreadWidth, toleranceReducer } from '../../renderer/state/tolerance';
import type { ToleranceResultDto } from '../../electron/contract';

const hinge = (crease: number, width: number): ToleranceResultDto['hinges'][number] => ({
  crease, label: `c${crease}`, nominalDeg: [10, 20], meanDeg: [10, 20], stdDeg: [0.1, 0.1],
  p05Deg: [10 - width / 2, 20], p50Deg: [10, 20], p95Deg: [10 + width / 2, 20], linearStdDeg: [0.1, 0.1],
});
const result = (hinges: ToleranceResultDto['hinges']): ToleranceResultDto => ({
  driveCrease: 0, driveLabel: 'c0', atDeg: [10, 20], samples: 5, requested: 5, seed: 1, status: 'complete', model: '',
  hinges, misfit: [], gap: [], linearMisfit: [], rigidFraction: [1, 1], lost: [0, 0], worstVertices: [], messages: [],
});
const request = { pathId: 'sweep-1', everyDeg: 10, positionTol: 0.1, samples: 5, seed: 1 };

describe('tolerance state', () => {
  it('keeps to the request it started: older answers and late progress are dropped', () => {
    let s = toleranceReducer(initialTolerance, { type: 'tolerance-started', requestId: 'a', request });
    s = toleranceReducer(s, { type: 'tolerance-started', requestId: 'b', request });
    expect(toleranceReducer(s, { type: 'tolerance-finished', requestId: 'a', result: result([]) })).toBe(s);
    s = toleranceReducer(s, { type: 'tolerance-progress', requestId: 'b', done: 2, total: 5 });
    expect(s.progress).toEqual({ done: 2, total: 5 });
    s = toleranceReducer(s, { type: 'tolerance-finished', requestId: 'b', result: result([]) });
    expect(s.status).toBe('done');
    expect(toleranceReducer(s, { type: 'tolerance-progress', requestId: 'b', done: 3, total: 5 })).toBe(s);
  });

  it('charts the chosen hinges, else the selected crease and the widest', () => {
    const r = result([hinge(1, 0.2), hinge(2, 0.6), hinge(3, 0.4), hinge(4, 0.1)]);
    expect(spreadWidth(r.hinges[1])).toBeCloseTo(0.6, 12);
    expect(shownHinges(r, [], null).map((h) => h.crease)).toEqual([2, 3, 1]);
    expect(shownHinges(r, [], 4).map((h) => h.crease)).toEqual([4, 2, 3]);
    expect(shownHinges(r, [3, 9], 4).map((h) => h.crease)).toEqual([3]);
  });
});
