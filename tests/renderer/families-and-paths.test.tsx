// @vitest-environment jsdom
// The interface for what the solver now reports and what a path can end with: families through the drive
// values and the search's completeness (with DTOs written here, as the contract shapes them), a drive past
// its stop, the path's origin and the reason and fixes when it ends with no samples or early.
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { buildPattern } from '../../solver/model/pattern';
import { loadPatternText } from '../../solver';
import { CAUTIONS } from '../../solver/formats/cautions';
import type { FamilyDto, PathResultDto, ProjectDto, SolutionDto, SolveResultDto } from '../../electron/contract';
import { SolutionCards, directionWords } from '../../renderer/views/SolutionCards';
import { DrivePanel } from '../../renderer/views/DrivePanel';
import { PathPanel } from '../../renderer/views/PathPanel';
import { PathCharts, clipMarks, endValue, spreadLabels, standaloneChartSvg } from '../../renderer/views/PathCharts';
import { initialState, reducer, type AppState } from '../../renderer/state/app';
import { shownState } from '../../renderer/state/display';
import { flippedRange, originWords, pathOutcome } from '../../renderer/state/path-words';

afterEach(cleanup);

const SAMPLES = path.resolve(__dirname, '..', '..', 'samples');
const rig = loadPatternText(readFileSync(path.join(SAMPLES, 'two-motor-rig.hingeplan.json'), 'utf8'), 'two-motor-rig.hingeplan.json');
const project = JSON.parse(JSON.stringify(rig.project)) as ProjectDto;
const pattern = buildPattern(rig.project!.source).pattern!;
const n = pattern.creases.length;

const state = (angles: number[], localDof = 0, matches = true): SolutionDto => ({
  anglesDeg: angles, maxResidual: 1e-15, vertexResiduals: [1e-15], matchesAssignment: matches, localDof, condition: localDof ? null : 2, signs: '++-+-', sensitivity: [],
});
const angles = Array.from({ length: n }, (_, i) => (i < 5 ? [40, 50, -18, 83, -9][i] : 0));
const family: FamilyDto = { dof: 1, representative: state(angles, 1), directions: [[[1, 0.71], [3, -0.7], [4, 0.05]]], matchesAssignment: true };
const base: SolveResultDto = {
  status: 'underspecified', dof: 1, patternDof: 2, solutions: [], families: [family],
  search: { complete: false, method: 'homotopy from flat rays and multistart', found: 1, note: 'a numerical search; states it did not reach may exist' },
  suggestedDrives: ['c3'], messages: [], iterations: 1,
};

describe('solutions panel', () => {
  it('shows a family as a card of its own, with its DOF, its free directions and the drive that pins it', () => {
    const onFamily = vi.fn(), onAdd = vi.fn();
    render(<SolutionCards pattern={pattern} project={project} solutions={[]} families={[family]} search={base.search} suggestedDrives={['c3']} selected={0} selectedFamily={0} active basePanel={0} onSelect={() => {}} onSelectFamily={onFamily} onAddDrive={onAdd} />);
    const card = screen.getByTestId('family-card');
    expect(card.textContent).toContain('Family 1 · 1 DOF');
    expect(card.textContent).toContain('moves along c1 +0.71, c3 −0.70, c4 +0.05');
    expect(screen.queryAllByTestId('solution-card')).toHaveLength(0);
    fireEvent.click(card);
    expect(onFamily).toHaveBeenCalledWith(0);
    fireEvent.click(screen.getByText('drive c3'));
    expect(onAdd).toHaveBeenCalledWith('c3');
    expect(screen.getByTestId('search-summary').querySelector('summary')!.textContent).toMatch(/^⚠ not proven complete/);
    expect(screen.getByTestId('search-summary').textContent).toContain('homotopy from flat rays and multistart: a numerical search');
    expect(screen.getByTestId('family-note').textContent).toContain('continuum through the drive values');
  });

  it('says when the list is complete, and when a cap stopped it', () => {
    const { rerender } = render(<SolutionCards pattern={pattern} project={project} solutions={[state(angles)]} search={{ complete: true, method: 'closed form (spherical four-bar)', found: 1, note: 'every state of a degree-4 vertex' }} selected={0} active basePanel={0} onSelect={() => {}} />);
    expect(screen.getByTestId('search-summary').querySelector('summary')!.textContent).toMatch(/^✓ complete list/);
    expect(screen.getByTestId('search-summary').textContent).toContain('closed form (spherical four-bar): every state of a degree-4 vertex');
    rerender(<SolutionCards pattern={pattern} project={project} solutions={[state(angles)]} search={{ complete: false, method: 'vertex-by-vertex enumeration', found: 500, limit: 500, note: 'stopped at the cap' }} selected={0} active basePanel={0} onSelect={() => {}} />);
    expect(screen.getByTestId('search-summary').textContent).toMatch(/stopped at 500 states/);
  });

  it('keeps states with local DOF above 0 off the cards and says how many lie on continua', () => {
    const sols = [state(angles), ...Array.from({ length: 43 }, () => state(angles, 1))];
    render(<SolutionCards pattern={pattern} project={project} solutions={sols} search={base.search} suggestedDrives={['c3']} selected={0} active basePanel={0} onSelect={() => {}} onAddDrive={() => {}} />);
    expect(screen.getAllByTestId('solution-card')).toHaveLength(1);
    expect(screen.getByTestId('solution-count').textContent).toBe('1');
    expect(screen.getByTestId('loose-states').textContent).toContain('43 states lie on continua');
    fireEvent.click(screen.getByText('show them'));
    expect(screen.getAllByTestId('solution-card')).toHaveLength(44);
  });

  it('words a free direction largest first', () => {
    expect(directionWords(project, [[0, 0.1], [2, -0.9], [1, 0]])).toBe('c2 −0.90, c0 +0.10');
  });
});

describe('drive past its stop', () => {
  const shown = { anglesDeg: angles, rates: null, source: 'solution' as const, caption: 's' };
  it('draws the stops on the slider and says the drive is past one', () => {
    render(<DrivePanel drives={[{ crease: 'c0', angleDeg: 175 }]} stops={{ c0: { minDeg: 0, maxDeg: 170 } }} shown={shown} solveStatus="done" onChange={() => {}} onDragEnd={() => {}} onRemove={() => {}} onAddSuggested={() => {}} />);
    expect(screen.getAllByTestId('slider-stop-zone')).toHaveLength(2);
    expect(screen.getByTestId('drive-stops').textContent).toBe('past its stop (stops 0° … 170°)');
  });

  it('keeps the last result that had a state while the drives are past a stop, and shows it', () => {
    const doc = reducer(initialState, { type: 'document-opened', id: 'd', document: { project, filePath: null, fileName: 'rig', format: 'project', messages: [] } });
    let s: AppState = reducer(doc, { type: 'solve-started', requestId: 'a', forDrives: '' });
    const good: SolveResultDto = { ...base, status: 'solved', families: [], solutions: [state(angles)] };
    s = reducer(s, { type: 'solve-finished', requestId: 'a', result: good });
    s = reducer(s, { type: 'solve-started', requestId: 'b', forDrives: '' });
    const refused: SolveResultDto = { ...base, status: 'invalid', families: [], solutions: [], patternDof: 0, messages: [{ severity: 'error', code: 'drive-outside-limit', text: 'Drive 1: 175° for crease c0 is outside its hinge limits 0° … 170°.' }] };
    s = reducer(s, { type: 'solve-finished', requestId: 'b', result: refused });
    expect(s.solve.lastValid?.result).toBe(good);
    const shownNow = shownState(s, n);
    expect(shownNow.source).toBe('last-valid');
    expect(shownNow.anglesDeg).toEqual(angles);
    expect(shownNow.caption).toBe('last solved state (a drive is now past its stop)');
    // a result with a state again drops it
    s = reducer(reducer(s, { type: 'solve-started', requestId: 'c', forDrives: '' }), { type: 'solve-finished', requestId: 'c', result: good });
    expect(s.solve.lastValid).toBeUndefined();
  });

  it('shows a family’s state when the drives leave no isolated solution', () => {
    const doc = reducer(initialState, { type: 'document-opened', id: 'd', document: { project, filePath: null, fileName: 'rig', format: 'project', messages: [] } });
    const s = reducer(reducer(doc, { type: 'solve-started', requestId: 'a', forDrives: '' }), { type: 'solve-finished', requestId: 'a', result: base });
    expect(s.selectedFamily).toBe(0);
    expect(shownState(s, n)).toMatchObject({ source: 'family', rates: null, caption: 'one state of family 1 (1 degree of freedom)' });
  });
});

describe('the path in words', () => {
  const samples = [0, 10, 20].map((d) => ({ driveDeg: d, anglesDeg: new Array(n).fill(d), maxResidual: 0, rates: new Array(n).fill(1), condition: 1, nearSingular: false }));
  const failed: PathResultDto = {
    pathId: 'p', driveCrease: 0, driveLabel: 'c0', samples: [], events: [], complete: false, status: 'failed',
    messages: [{ severity: 'error', code: 'no-matching-branch', text: 'None of the 2 start states matches the mountain/valley assignment; choose one with the solution option (1 … 2).' }],
  };
  const withPath = (result: PathResultDto, origin: AppState['path']['origin']): AppState => ({
    ...initialState,
    solve: { status: 'done', result: { ...base, status: 'several-solutions', families: [], solutions: [state(angles), state(angles, 0, false)] } },
    selectedSolution: 1,
    path: { status: 'done', result, origin, asked: { drive: 'c0', fromDeg: 0, toDeg: 180, stepDeg: 1 } },
  });

  it('gives the solver’s reason when a path has no samples, and the fixes', () => {
    const o = pathOutcome(withPath(failed, { kind: 'flat' }))!;
    expect(o.headline).toBe('No path');
    expect(o.reason).toBe(failed.messages[0].text);
    expect(o.fixes.map((f) => f.id)).toEqual(['from-solution', 'flip', 'branches']);
    expect(o.fixes[0].label).toBe('Start from solution #2');
    expect(o.fixes[1].label).toBe('Run the other way: 0° → -180°');
    expect(flippedRange({ drive: 'c0', fromDeg: 30, toDeg: 150, stepDeg: 1 })).toEqual({ fromDeg: -30, toDeg: -150 });
  });

  it('names the event that ended a path early, and nothing for a complete one', () => {
    const partial: PathResultDto = { ...failed, samples, status: 'partial', messages: [], events: [{ type: 'folded-flat', driveDeg: 20, text: 'Crease c3 folds flat (±180°) at c0 = 20°.' }] };
    const o = pathOutcome(withPath(partial, { kind: 'solution', index: 0, matchesAssignment: true }))!;
    expect(o).toMatchObject({ tone: 'note', headline: 'Ended early at c0 = 20°', reason: 'Crease c3 folds flat (±180°) at c0 = 20°.' });
    expect(pathOutcome(withPath({ ...partial, status: 'complete', complete: true }, { kind: 'flat' }))).toBeNull();
  });

  it('says what the path started from and which branch it follows', () => {
    const named: PathResultDto = { ...failed, samples, status: 'complete', complete: true, branchName: 'B+', branchMatchesAssignment: false };
    expect(originWords({ kind: 'solution', index: 1, matchesAssignment: false }, named)).toBe('from solution #2 (differs from M/V), on branch B+');
    expect(originWords({ kind: 'flat', branchId: '3' }, named)).toBe('from flat along B+ (differs from M/V)');
    expect(originWords({ kind: 'ray', name: 'C−', atDeg: 12.5 }, named)).toBe('along C− from the branch point at 12.5°');
  });

  it('draws the reason and runs a fix from the path panel', () => {
    const onFix = vi.fn();
    const s = withPath(failed, { kind: 'flat' });
    render(
      <PathPanel
        project={project} path={s.path} branches={{ status: 'idle' }} form={{ drive: 'c0', from: '0', to: '180', step: '1', start: 'flat', rangeTouched: false, contact: true, clearance: '0' }} tab="charts"
        outcome={pathOutcome(s)} scrubIndex={null} selectedCrease={null} solutionOnScreen="#2" problem={null}
        onForm={() => {}} onTab={() => {}} onCompute={() => {}} onCancel={() => {}} onFix={onFix} onScrub={() => {}} onLoadBranches={() => {}} onPickBranch={() => {}} onFollowRay={() => {}}
      />,
    );
    expect(screen.getByTestId('path-reason').textContent).toBe(failed.messages[0].text);
    fireEvent.click(screen.getByTestId('fix-flip'));
    expect(onFix).toHaveBeenCalledWith('flip');
  });
});

describe('path charts', () => {
  it('marks where a curve leaves the plot, once per excursion', () => {
    expect(clipMarks([0, 1, 5, 6, 1, -7, NaN, 2], [-3, 3])).toEqual([{ index: 2, side: 'top' }, { index: 5, side: 'bottom' }]);
  });

  it('spreads end labels apart in order and within the plot', () => {
    const ys = spreadLabels([10, 10, 10, 100, 100], 11, 5, 100);
    const sorted = [...ys].sort((a, b) => a - b);
    for (let k = 1; k < sorted.length; k++) expect(sorted[k] - sorted[k - 1]).toBeGreaterThanOrEqual(11 - 1e-9);
    expect(Math.min(...ys)).toBeGreaterThanOrEqual(5);
    expect(Math.max(...ys)).toBeLessThanOrEqual(100);
  });

  it('ends a curve on the side it comes from when its last value wraps (±180° are one rotation)', () => {
    expect(endValue([170, 178, -180])).toEqual({ i: 2, v: 180 });
    expect(endValue([-170, -180, NaN])).toEqual({ i: 1, v: -180 });
  });

  it('labels the curves, notes the clipped ones, and exports a stand-alone SVG with the cautions line', () => {
    // c1's rate shoots up at the last of 40 samples (as near a singular state): past the plot's 95th percentile
    const rates = (k: number) => Array.from({ length: n }, (_, c) => (c === 1 ? (k === 39 ? 120 : 0.3 + 0.01 * k) : 0.1 * c));
    const samples = Array.from({ length: 40 }, (_, k) => ({ driveDeg: k, anglesDeg: Array.from({ length: n }, (_, c) => c * k), maxResidual: 0, rates: rates(k), condition: 1, nearSingular: false }));
    const result: PathResultDto = { pathId: 'p', driveCrease: 0, driveLabel: 'c0', samples, events: [], messages: [], complete: true };
    const { container } = render(<PathCharts path={result} project={project} selectedCrease={null} current={0} width={500} onScrub={() => {}} />);
    expect(container.querySelectorAll('[data-testid=rate-chart] [data-testid=clip-mark]').length).toBeGreaterThan(0);
    expect(screen.getByTestId('clipped-note').textContent).toMatch(/▲▼ 1 off the plot, \|rate\| to 120/);
    expect([...container.querySelectorAll('[data-testid=angle-chart] .curve-label')].map((e) => e.lastChild?.textContent)).toContain('c1');
    const svgs = [...container.querySelectorAll('.chart > svg')] as SVGSVGElement[];
    const file = standaloneChartSvg(result, svgs, 500, [150, 130]);
    expect(file).toContain(`<desc>${CAUTIONS}</desc>`);
    expect(file.match(/<text[^>]*class="cautions"[^>]*>/g)!.length).toBeGreaterThan(0);
    expect(new DOMParser().parseFromString(file, 'image/svg+xml').getElementsByTagName('parsererror')).toHaveLength(0);
  });
});
