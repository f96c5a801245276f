// @vitest-environment jsdom
// Component tests of the views, and of the whole window over an in-process stand-in for the main process
// that runs the real solver jobs (electron/jobs.ts) behind the real bridge (electron/bridge.ts).
import { afterEach, describe, expect, it, vi } from 'vitest';
import { act, cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { buildPattern } from '../../solver/model/pattern';
import { loadPatternText, solveDrives } from '../../solver';
import type { PathResultDto, ProjectDto, SolutionDto } from '../../electron/contract';
import { createHingeplanApi, type Transport } from '../../electron/bridge';
import { createJobs } from '../../electron/job-table';
import { SheetView, DASHES, creaseGroups } from '../../renderer/views/SheetView';
import { DrivePanel } from '../../renderer/views/DrivePanel';
import { HingeTable } from '../../renderer/views/HingeTable';
import { SolutionCards } from '../../renderer/views/SolutionCards';
import { PathCharts } from '../../renderer/views/PathCharts';
import { FoldedView } from '../../renderer/views/FoldedView';
import { hingeRows } from '../../renderer/state/display';
import { App } from '../../renderer/App';
import { Controller } from '../../renderer/controller';
import { createStore } from '../../renderer/state/store';

afterEach(cleanup);

const SAMPLES = path.resolve(__dirname, '..', '..', 'samples');
const couponText = readFileSync(path.join(SAMPLES, 'hinge-coupon.hingeplan.json'), 'utf8');
const coupon = loadPatternText(couponText, 'hinge-coupon.hingeplan.json');
const project = JSON.parse(JSON.stringify(coupon.project)) as ProjectDto;
const pattern = buildPattern(coupon.project!.source).pattern!;
const reference = solveDrives(pattern, coupon.drives!);
const DEG = 180 / Math.PI;
const solutionDto = (i: number): SolutionDto => ({
  anglesDeg: Array.from(reference.solutions[i].angles, (a) => a * DEG),
  maxResidual: reference.solutions[i].maxResidual,
  vertexResiduals: reference.solutions[i].vertexResiduals,
  matchesAssignment: reference.solutions[i].matchesAssignment,
  localDof: 0,
  condition: 3,
  signs: reference.solutions[i].signs,
  sensitivity: [],
});

describe('flat sheet', () => {
  it('draws valleys dashed and mountains dash-dot, tinted by the angle, with the base panel and drive marked', () => {
    const angles = Array.from(reference.solutions[0].angles, (a) => a * DEG);
    const { container } = render(
      <SheetView pattern={pattern} project={project} anglesDeg={angles} selectedCrease={null} hoverCrease={null} violatingPanels={new Set()} onHover={() => {}} onSelect={() => {}} />,
    );
    const valley = container.querySelectorAll('path.crease-valley');
    const mountain = container.querySelectorAll('path.crease-mountain');
    expect(valley.length).toBeGreaterThan(0);
    expect(mountain.length).toBeGreaterThan(0);
    valley.forEach((p) => expect(p.getAttribute('stroke-dasharray')).toBe(DASHES.valley));
    mountain.forEach((p) => expect(p.getAttribute('stroke-dasharray')).toBe(DASHES.mountain));
    expect(DASHES.mountain!.split(' ').length).toBe(4); // dash, gap, dot, gap
    expect(container.querySelector('[data-testid=base-panel]')!.getAttribute('d')).toMatch(/^M/);
    expect(container.querySelectorAll('path.sheet-drive-halo').length).toBe(1);
    expect(screen.getByText('drive c0')).toBeTruthy();
  });

  it('groups thousands of creases into few paths', () => {
    const groups = creaseGroups(pattern, new Array(pattern.creases.length).fill(0));
    // one group per line style when everything is flat
    expect(new Set(groups.map((g) => g.style)).size).toBe(groups.length);
  });
});

describe('drives panel', () => {
  const shown = { anglesDeg: solutionDto(0).anglesDeg, rates: null, source: 'solution' as const, caption: 's', solution: solutionDto(0) };
  it('shows the status in words, DOF, residual and condition, and sends typed angles', () => {
    const onChange = vi.fn();
    render(
      <DrivePanel
        drives={[{ crease: 'c0', angleDeg: 45 }]}
        result={{ status: 'solved', dof: 0, patternDof: 1, solutions: [solutionDto(0)], families: [], search: { complete: true, method: 'test', found: 0, note: '' }, messages: [], iterations: 4 }}
        solveStatus="done"
        shown={shown}
        onChange={onChange}
        onDragEnd={() => {}}
        onRemove={() => {}}
        onAddSuggested={() => {}}
      />,
    );
    expect(screen.getByTestId('solve-status').textContent).toContain('Solved');
    expect(screen.getByTestId('dof').textContent).toBe('0');
    expect(screen.getByTestId('condition').textContent).toBe('3.0');
    // residuals in radians, as the command line and the tables give them
    expect(screen.getByTestId('residual').textContent).toMatch(/^\d\.\de[-+]\d+ rad$/);
    const field = screen.getByLabelText('angle of drive c0 in degrees');
    fireEvent.focus(field);
    fireEvent.change(field, { target: { value: '30,5' } });
    fireEvent.blur(field);
    expect(onChange).toHaveBeenCalledWith('c0', 30.5, false);
    fireEvent.change(screen.getByLabelText('slider for drive c0'), { target: { value: '60' } });
    expect(onChange).toHaveBeenLastCalledWith('c0', 60, true);
  });

  it('offers the suggested drives of an underspecified pattern', () => {
    const add = vi.fn();
    render(
      <DrivePanel drives={[]} result={{ status: 'underspecified', dof: 1, patternDof: 1, solutions: [], families: [], search: { complete: true, method: 'test', found: 0, note: '' }, suggestedDrives: ['c0'], messages: [], iterations: 0 }} solveStatus="done" shown={{ ...shown, solution: undefined }} onChange={() => {}} onDragEnd={() => {}} onRemove={() => {}} onAddSuggested={add} />,
    );
    fireEvent.click(screen.getByText('Drive c0'));
    expect(add).toHaveBeenCalledWith('c0');
  });
});

describe('hinge table', () => {
  const shown = { anglesDeg: solutionDto(0).anglesDeg, rates: null, source: 'solution' as const, caption: 's' };
  it('sorts by angle, edits labels and limits in place, copies the rows shown', () => {
    const onRename = vi.fn(), onLimit = vi.fn(), onCopy = vi.fn();
    render(<HingeTable rows={hingeRows(project, shown)} selectedCrease={null} caption="c" height={400} onSelect={() => {}} onRename={onRename} onLimit={onLimit} onCopy={onCopy} />);
    const order = () => Array.from(document.querySelectorAll('.table-body .row')).map((r) => r.getAttribute('data-label'));
    expect(order()).toEqual(['c0', 'c1', 'c2', 'c3']);
    fireEvent.click(screen.getByText('angle °'));
    const byAngle = [...hingeRows(project, shown)].sort((a, b) => a.angleDeg - b.angleDeg).map((r) => r.label);
    expect(order()).toEqual(byAngle);
    const label = screen.getByLabelText('label of crease 1');
    fireEvent.focus(label);
    fireEvent.change(label, { target: { value: 'hinge-B' } });
    fireEvent.blur(label);
    expect(onRename).toHaveBeenCalledWith(1, 'hinge-B');
    const max = screen.getByLabelText('upper limit of crease c1');
    fireEvent.focus(max);
    fireEvent.change(max, { target: { value: '120' } });
    fireEvent.blur(max);
    expect(onLimit).toHaveBeenCalledWith(1, { minDeg: undefined, maxDeg: 120 });
    fireEvent.change(screen.getByLabelText('filter hinges'), { target: { value: 'c3' } });
    fireEvent.click(screen.getByText('Copy as CSV'));
    expect(onCopy.mock.calls[0][0].map((r: { label: string }) => r.label)).toEqual(['c3']);
  });
});

describe('solution cards', () => {
  it('shows each solution with its sign pattern and assignment match, and selects on click', () => {
    const onSelect = vi.fn();
    const sols = reference.solutions.map((_, i) => solutionDto(i));
    render(<SolutionCards pattern={pattern} project={project} solutions={sols} selected={0} active basePanel={pattern.basePanel} onSelect={onSelect} />);
    const cards = screen.getAllByTestId('solution-card');
    expect(cards.length).toBeGreaterThan(0);
    expect(cards[0].querySelectorAll('polygon').length).toBe(pattern.panels.length);
    const last = cards[cards.length - 1];
    fireEvent.click(last);
    expect(onSelect).toHaveBeenCalledWith(Number(last.getAttribute('data-index')));
  });
});

describe('path charts', () => {
  it('marks events and shades near-singular stretches, and scrubs on drag', () => {
    const n = pattern.creases.length;
    const samples = [0, 10, 20, 30].map((d, i) => ({ driveDeg: d, anglesDeg: new Array(n).fill(d), maxResidual: 0, rates: new Array(n).fill(1), condition: 1, nearSingular: i === 0 }));
    const result: PathResultDto = {
      pathId: 'p', driveCrease: 0, driveLabel: 'c0', samples,
      events: [{ type: 'branch-point', driveDeg: 0, text: 'flat state' }, { type: 'hinge-limit', driveDeg: 20, text: 'c0 reaches 20°', crease: 0 }],
      messages: [], complete: true,
    };
    const onScrub = vi.fn();
    const { container } = render(<PathCharts path={result} project={project} selectedCrease={null} current={1} width={500} onScrub={onScrub} />);
    expect(container.querySelectorAll('[data-testid=angle-chart] .event').length).toBe(2);
    expect(container.querySelectorAll('[data-testid=rate-chart] .near-singular').length).toBe(1);
    expect(container.querySelectorAll('[data-testid=angle-chart] .current').length).toBe(1);
    const chart = container.querySelector('[data-testid=angle-chart]') as SVGSVGElement;
    chart.getBoundingClientRect = () => ({ left: 0, top: 0, width: 500, height: 150, right: 500, bottom: 150, x: 0, y: 0, toJSON: () => ({}) });
    fireEvent.pointerDown(chart, { clientX: 490, pointerId: 1 });
    expect(onScrub).toHaveBeenLastCalledWith(3, false);
  });
});

describe('folded view', () => {
  it('says plainly when the computer has no WebGL', () => {
    render(<FoldedView pattern={pattern} project={project} anglesDeg={[]} caption="x" selectedCrease={null} violatingPanels={new Set()} ghost={false} labels={false} fitRequest={0} onToggleGhost={() => {}} onToggleLabels={() => {}} onFit={() => {}} />);
    expect(screen.getByText(/needs WebGL/)).toBeTruthy();
  });
});

// ---------- the whole window ----------

function inProcessTransport() {
  const jobs = createJobs();
  const ctx = { progress() {}, shouldStop: () => false };
  const asked: string[] = [];
  const t: Transport = {
    async invoke(channel, payload) {
      asked.push(channel);
      const p = payload as Record<string, unknown>;
      const ok = (value: unknown) => ({ ok: true, value });
      switch (channel) {
        case 'app:startup': {
          const loaded = jobs.load({ bytes: new TextEncoder().encode(couponText), fileName: 'hinge-coupon.hingeplan.json' }, ctx) as { project: ProjectDto };
          return ok({ version: 't', platform: 'test', document: { project: loaded.project, filePath: null, fileName: 'hinge-coupon.hingeplan.json', format: 'project', messages: [] }, recovery: [], recent: [], startupMessages: [] });
        }
        case 'pattern:set':
          return ok(jobs['set-pattern'](p, ctx));
        case 'solve':
          return ok({ status: 'done', value: jobs.solve(p, ctx) });
        case 'doc:state':
        case 'recovery:write':
        case 'recovery:clear':
          return ok({ ok: true });
        default:
          return { ok: false, error: { code: 'not-here', message: `${channel} is not part of this test` } };
      }
    },
    on: () => () => {},
  };
  return { t, asked };
}

describe('the window', () => {
  it('opens the startup document, solves it, marks a second drive from the sheet, and undoes with the keyboard', async () => {
    const { t, asked } = inProcessTransport();
    const controller = new Controller(createHingeplanApi(t), createStore());
    controller.start();
    render(<App controller={controller} />);
    await act(() => controller.startup());
    await waitFor(() => expect(screen.getByTestId('solve-status').textContent).toMatch(/Solved|Several solutions/));
    expect(screen.getByTestId('doc-title').textContent).toContain('hinge-coupon.hingeplan.json');
    // the table shows the solver's angles for the solution on screen
    const sel = controller.state.selectedSolution;
    const want = reference.solutions[sel].angles;
    const rows = document.querySelectorAll('.table-body .row');
    expect(rows.length).toBe(4);
    for (const row of rows) {
      const i = Number(row.getAttribute('data-crease'));
      const shown = within(row as HTMLElement).getByTestId('angle-cell').textContent!;
      expect(Number(shown.replace('°', ''))).toBeCloseTo(want[i] * DEG, 2);
    }
    // pick crease c1 in the table, make it a drive: the document is edited
    fireEvent.click(document.querySelector('.table-body .row[data-label=c1]')!);
    fireEvent.click(screen.getByTestId('toggle-drive'));
    expect(controller.state.doc!.history.present.drives.map((d) => d.crease)).toEqual(['c0', 'c1']);
    expect(screen.getByTestId('doc-title').textContent).toContain('edited');
    await waitFor(() => expect(screen.getAllByTestId('drive-row').length).toBe(2));
    fireEvent.keyDown(window, { key: 'z', ctrlKey: true });
    expect(controller.state.doc!.history.present.drives.map((d) => d.crease)).toEqual(['c0']);
    fireEvent.keyDown(window, { key: 'Z', ctrlKey: true, shiftKey: true });
    expect(controller.state.doc!.history.present.drives.map((d) => d.crease)).toEqual(['c0', 'c1']);
    expect(asked).toContain('pattern:set');
    controller.stop();
  });
});
