// The document as plain data: edits are pure and refuse bad input with a message naming the crease; undo
// is a stack of documents, with one step per slider drag.
import { describe, expect, it } from 'vitest';
import type { ProjectDto } from '../../electron/contract';
import { addDrive, creaseIndexByLabel, creaseLabel, limitDeg, limitState, panelName, removeDrive, renameCrease, setCreaseLimit, setDriveAngle, setPanelName } from '../../renderer/state/document';
import { commit, redo, seal, startHistory, undo, canUndo, HISTORY_LIMIT } from '../../renderer/state/history';
import { initialState, isDirty, nearestSolution, reducer } from '../../renderer/state/app';

function coupon(): ProjectDto {
  return {
    source: {
      name: 'coupon',
      vertices: [[0, 0], [1, 0], [0, 1], [-1, 0], [0, -1]],
      edges: [[0, 1], [0, 2], [0, 3], [0, 4], [1, 2]],
      assignments: ['V', 'M', 'M', 'M', 'B'],
      labels: ['c0', 'c1', undefined, 'c3', 'rim'],
      limits: [{ min: 0, max: Math.PI / 2 }, undefined, undefined, undefined, undefined],
    },
    drives: [{ crease: 'c0', angleDeg: 45 }],
  };
}

describe('document edits', () => {
  it('names panels uniquely, clears a name with an empty one, and shows unnamed panels by index', () => {
    const p = coupon();
    const named = setPanelName(p, 2, '  hinge plate ');
    expect(named.ok && named.project.source.panelNames).toEqual([undefined, undefined, 'hinge plate']);
    if (!named.ok) return;
    expect(panelName(named.project, 2)).toBe('hinge plate');
    expect(panelName(named.project, 0)).toBe('panel 0');
    expect(setPanelName(named.project, 0, 'hinge plate')).toEqual({ ok: false, message: 'Panel 2 is already named "hinge plate"; panel names must be unique.' });
    const cleared = setPanelName(named.project, 2, '');
    expect(cleared.ok && cleared.project.source.panelNames).toBeUndefined();
    expect(p.source.panelNames).toBeUndefined();
  });

  it('reads labels as the solver does: the file label, else the index', () => {
    const p = coupon();
    expect(creaseLabel(p, 0)).toBe('c0');
    expect(creaseLabel(p, 2)).toBe('2');
    expect(creaseIndexByLabel(p, '2')).toBe(2);
    expect(creaseIndexByLabel(p, 'c3')).toBe(3);
    // a bare number that is some other crease's label wins over the index only when the index has no label
    expect(creaseIndexByLabel(p, '1')).toBeUndefined();
  });

  it('sets a drive angle without touching the original document, clamped to ±180°', () => {
    const p = coupon();
    const r = setDriveAngle(p, 'c0', 200);
    expect(r.ok && r.project.drives[0].angleDeg).toBe(180);
    expect(p.drives[0].angleDeg).toBe(45);
    expect(setDriveAngle(p, 'c9', 10)).toEqual({ ok: false, message: 'Crease c9 is not a drive.' });
    expect(setDriveAngle(p, 'c0', NaN).ok).toBe(false);
  });

  it('adds and removes drives, refusing boundary edges and repeats', () => {
    const p = coupon();
    const added = addDrive(p, 2, 10);
    expect(added.ok && added.project.drives).toEqual([{ crease: 'c0', angleDeg: 45 }, { crease: '2', angleDeg: 10 }]);
    expect(addDrive(p, 4)).toMatchObject({ ok: false, message: expect.stringContaining('boundary') });
    expect(addDrive(p, 0)).toMatchObject({ ok: false, message: 'Crease c0 is already a drive.' });
    const removed = removeDrive(p, 'c0');
    expect(removed.ok && removed.project.drives).toEqual([]);
  });

  it('renames a crease and the drive that used the old name follows it', () => {
    const r = renameCrease(coupon(), 0, '  hinge-A ');
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.project.source.labels[0]).toBe('hinge-A');
      expect(r.project.drives).toEqual([{ crease: 'hinge-A', angleDeg: 45 }]);
    }
  });

  it('refuses labels that are empty, taken, or another crease’s index', () => {
    const p = coupon();
    expect(renameCrease(p, 1, '')).toMatchObject({ ok: false, message: expect.stringContaining('empty') });
    expect(renameCrease(p, 1, 'c3')).toMatchObject({ ok: false, message: expect.stringContaining('already used by crease 3') });
    expect(renameCrease(p, 1, '2')).toMatchObject({ ok: false, message: expect.stringContaining('crease 2') });
  });

  it('sets limits in degrees, stores radians, and refuses an upside-down range', () => {
    const r = setCreaseLimit(coupon(), 1, { minDeg: -170, maxDeg: 0 });
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.project.source.limits[1]!.min).toBeCloseTo((-170 * Math.PI) / 180, 15);
      expect(limitDeg(r.project, 1)).toEqual({ minDeg: expect.closeTo(-170, 12), maxDeg: 0 });
    }
    expect(setCreaseLimit(coupon(), 1, { minDeg: 10, maxDeg: -10 })).toMatchObject({ ok: false, message: expect.stringContaining('above its upper limit') });
    expect(setCreaseLimit(coupon(), 1, { minDeg: -200 })).toMatchObject({ ok: false });
    const cleared = setCreaseLimit(coupon(), 0, {});
    expect(cleared.ok && cleared.project.source.limits[0]).toBeUndefined();
  });

  it('tells an angle inside, on and beyond its hinge limit', () => {
    const p = coupon();
    expect(limitState(p, 0, 45)).toBe('ok');
    expect(limitState(p, 0, 90)).toBe('at-limit');
    expect(limitState(p, 0, 95)).toBe('beyond');
    expect(limitState(p, 0, -1)).toBe('beyond');
    expect(limitState(p, 1, 95)).toBe('none');
  });
});

describe('undo history', () => {
  it('undoes and redoes whole documents; a new edit drops the redo branch', () => {
    let h = startHistory('a');
    h = commit(h, 'b');
    h = commit(h, 'c');
    h = undo(h);
    expect(h.present).toBe('b');
    h = redo(h);
    expect(h.present).toBe('c');
    h = undo(undo(h));
    h = commit(h, 'x');
    expect(h.present).toBe('x');
    expect(h.future).toEqual([]);
    expect(undo(h).present).toBe('a');
  });

  it('makes one undo step of a drag (same coalesce key) until the drag is sealed', () => {
    let h = startHistory(0);
    for (let v = 1; v <= 30; v++) h = commit(h, v, 'drive:c0');
    expect(h.past).toEqual([0]);
    h = seal(h);
    h = commit(h, 31, 'drive:c0');
    expect(h.past).toEqual([0, 30]);
    expect(canUndo(startHistory(1))).toBe(false);
  });

  it('keeps at most its limit of steps', () => {
    let h = startHistory(0);
    for (let v = 1; v <= HISTORY_LIMIT + 50; v++) h = commit(h, v);
    expect(h.past.length).toBe(HISTORY_LIMIT);
  });
});

describe('app reducer', () => {
  const opened = reducer(initialState, {
    type: 'document-opened',
    id: 'd1',
    document: { project: coupon(), filePath: '/w/c.hingeplan.json', fileName: 'c.hingeplan.json', format: 'project', messages: [] },
  });

  it('is clean after opening, dirty after an edit, clean again after undo and after save', () => {
    expect(isDirty(opened.doc)).toBe(false);
    const r = setDriveAngle(opened.doc!.history.present, 'c0', 30);
    const edited = reducer(opened, { type: 'edit', project: r.ok ? r.project : coupon() });
    expect(isDirty(edited.doc)).toBe(true);
    expect(isDirty(reducer(edited, { type: 'undo' }).doc)).toBe(false);
    const saved = reducer(edited, { type: 'saved', filePath: '/w/c.hingeplan.json', fileName: 'c.hingeplan.json', project: edited.doc!.history.present });
    expect(isDirty(saved.doc)).toBe(false);
  });

  it('treats a recovered document as unsaved', () => {
    const s = reducer(initialState, { type: 'document-opened', id: 'd2', document: { project: coupon(), filePath: null, fileName: 'c', format: 'project', messages: [], recovered: true } });
    expect(isDirty(s.doc)).toBe(true);
  });

  it('ignores the answer of a solve that a newer one replaced', () => {
    let s = reducer(opened, { type: 'solve-started', requestId: 'old', forDrives: '[]' });
    s = reducer(s, { type: 'solve-started', requestId: 'new', forDrives: '[]' });
    const result = { status: 'solved' as const, dof: 0, patternDof: 1, solutions: [], families: [], search: { complete: true, method: 'test', found: 0, note: '' }, messages: [], iterations: 1 };
    expect(reducer(s, { type: 'solve-finished', requestId: 'old', result })).toBe(s);
    expect(reducer(s, { type: 'solve-finished', requestId: 'new', result }).solve.status).toBe('done');
  });

  it('keeps progress to the running path and clamps scrubbing to its samples', () => {
    let s = reducer(opened, { type: 'path-started', requestId: 'p', drive: 'c0' });
    s = reducer(s, { type: 'path-progress', requestId: 'other', done: 5, total: 10 });
    expect(s.path.progress).toEqual({ done: 0, total: 0 });
    s = reducer(s, { type: 'path-progress', requestId: 'p', done: 5, total: 10 });
    expect(s.path.progress).toEqual({ done: 5, total: 10 });
    const sample = { driveDeg: 0, anglesDeg: [0], maxResidual: 0, rates: [1], condition: 1, nearSingular: false };
    s = reducer(s, { type: 'path-finished', requestId: 'p', result: { pathId: 'p', driveCrease: 0, driveLabel: 'c0', samples: [sample, sample, sample], events: [], messages: [], complete: true } });
    expect(reducer(s, { type: 'scrub', index: 99 }).scrubIndex).toBe(2);
    expect(reducer(s, { type: 'scrub', index: -4 }).scrubIndex).toBe(0);
  });

  it('after a re-solve keeps the solution nearest the state on screen, else one that follows the assignment', () => {
    const sol = (a: number[], m: boolean) => ({ anglesDeg: a, maxResidual: 0, vertexResiduals: [], matchesAssignment: m, localDof: 0, condition: 1, signs: '', sensitivity: [] });
    const result = { status: 'several-solutions' as const, dof: 0, patternDof: 1, solutions: [sol([10, -10], false), sol([40, 40], true), sol([-30, 30], false)], families: [], search: { complete: true, method: 'test', found: 3, note: '' }, messages: [], iterations: 1 };
    expect(nearestSolution(result, [-29, 29])).toBe(2);
    expect(nearestSolution(result, undefined)).toBe(1);
  });
});
