// The tolerance job through the main process's handler and the real solver worker: the numbers equal the
// solver's own run in Node (the same seed gives the same sheets), progress reaches the page, cancel frees the
// lane, and a bad request is refused at the boundary.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, promises as fs } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createService, type DialogHost } from '../../electron/service';
import { SolverClient } from '../../electron/solver-client';
import { nodeWorkerSpawner } from '../../electron/worker-client';
import { RecentFiles, RecoveryStore } from '../../electron/files';
import { buildPattern, miura } from '../../solver';
import { runSteps } from '../../solver/paths/sweep';
import { toleranceSteps } from '../../solver/outputs/tolerance/run';
import { buildWorker, SAMPLES } from './support';

class Host implements DialogHost {
  events: unknown[] = [];
  async chooseOpenFile() { return null; }
  async chooseSaveFile() { return null; }
  async confirmDiscard() { return 'discard' as const; }
  writeClipboard() {}
  documentState() {}
  emit(event: string, payload: unknown) { this.events.push([event, payload]); }
  closeReady() {}
  recentChanged() {}
}

const D = Math.PI / 180;
let solver: SolverClient;
let tmp: string;
let host: Host;
let service: ReturnType<typeof createService>;

beforeAll(async () => {
  const worker = await buildWorker('electron/solver-worker.ts');
  solver = new SolverClient({ spawn: nodeWorkerSpawner(worker) });
  tmp = mkdtempSync(path.join(os.tmpdir(), 'hingeplan-tolerance-service-'));
  host = new Host();
  service = createService({
    solver, host,
    recovery: new RecoveryStore(path.join(tmp, 'recovery')),
    recent: new RecentFiles(path.join(tmp, 'recent.json')),
    startup: { version: 't', platform: 'linux', samplePath: path.join(SAMPLES, 'hinge-coupon.hingeplan.json') },
  });
});

afterAll(async () => {
  solver.dispose();
  await fs.rm(tmp, { recursive: true, force: true });
});

async function call(channel: string, payload: unknown) {
  const r = await service.dispatch(channel, payload);
  if (!r.ok) throw new Error(`${channel}: ${r.error.message}`);
  return r.value;
}

describe('tolerance in the solver worker', () => {
  const m = miura({ rows: 2, cols: 3, a: 40, b: 30, alphaDeg: 70 }).project!;
  const drive = m.drives[0].crease;
  const sign = Math.sign(m.drives[0].angleDeg);
  const path = { drive, fromDeg: 20 * sign, toDeg: 80 * sign, stepDeg: 10, held: [] };
  const options = { pathId: 'path-1', everyDeg: 30, positionTol: 0.1, samples: 16, seed: 3 };

  it('follows the path on screen and answers what the solver computes in-process, with progress per sheet', async () => {
    await call('pattern:set', { key: 'm23', source: m.source });
    const swept = (await call('sweep', { requestId: 'path-1', key: 'm23', options: path })) as { status: string };
    expect(swept.status).toBe('done');
    host.events = [];
    const answer = (await call('tolerance', { requestId: 'tol-1', key: 'm23', options })) as { status: string; value: import('../../electron/contract').ToleranceResultDto };
    expect(answer.status).toBe('done');
    const v = answer.value;
    expect(v.status).toBe('complete');
    expect(v.samples).toBe(16);
    // the path's samples every 30°: 20°, 50°, 80° (exactly as the path asked for them)
    expect(v.atDeg).toEqual([20, 50, 80].map((d) => d * sign));
    const pattern = buildPattern(m.source).pattern!;
    const at = [20, 50, 80].map((d) => d * sign * D);
    const ref = runSteps(toleranceSteps(pattern, {
      path: { drive: pattern.labelIndex.get(drive)!, from: at[0], to: at[2], samples: at, conditionEvery: 0 },
      tolerance: { position: 0.1, sector: 0 }, samples: 16, seed: 3,
    }));
    const st = ref.statistics!;
    ref.hinges.forEach((c, h) => {
      const dto = v.hinges.find((x) => x.crease === c)!;
      at.forEach((_, j) => {
        expect(dto.p05Deg[j]).toBeCloseTo(st.hinges[j][h].angle.p05 / D, 9);
        expect(dto.p95Deg[j]).toBeCloseTo(st.hinges[j][h].angle.p95 / D, 9);
        expect(dto.linearStdDeg[j]).toBeCloseTo(ref.linear!.hingeStd[j]![h] / D, 9);
      });
    });
    v.misfit.forEach((x, j) => expect(x.p95).toBeCloseTo(st.misfit[j].p95, 12));
    expect(v.worstVertices.length).toBeGreaterThan(0);
    const progress = host.events.filter((e) => (e as [string])[0] === 'job:progress');
    expect(progress.length).toBeGreaterThan(0);
    expect(progress.at(-1)).toMatchObject(['job:progress', { requestId: 'tol-1', total: 16 }]);
  });

  it('says so when the path is not known, stops on cancel, and the lane is free again', async () => {
    await call('pattern:set', { key: 'm23', source: m.source });
    const unknown = await service.dispatch('tolerance', { requestId: 'tol-x', key: 'm23', options: { ...options, pathId: 'nope' } });
    expect(unknown.ok).toBe(false);
    if (!unknown.ok) expect(unknown.error.message).toMatch(/compute the path again/);
    await call('sweep', { requestId: 'path-2', key: 'm23', options: path });
    host.events = [];
    const running = service.dispatch('tolerance', { requestId: 'tol-2', key: 'm23', options: { ...options, pathId: 'path-2', samples: 100_000 } });
    for (let i = 0; i < 500 && !host.events.length; i++) await new Promise((r) => setTimeout(r, 20));
    expect(host.events.length).toBeGreaterThan(0);
    expect(await call('job:cancel', { requestId: 'tol-2' })).toEqual({ cancelled: true });
    expect(await running).toEqual({ ok: true, value: { status: 'cancelled' } });
    const again = (await call('tolerance', { requestId: 'tol-3', key: 'm23', options: { ...options, pathId: 'path-2', samples: 2 } })) as { status: string; value: { samples: number } };
    expect(again.status).toBe('done');
    expect(again.value.samples).toBe(2);
  });

  it('refuses a bad request at the boundary, naming the field', async () => {
    const r = await service.dispatch('tolerance', { requestId: 'tol-4', key: 'm23', options: { ...options, sectorTolDeg: 60 } });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toMatch(/sectorTolDeg/);
    const s = await service.dispatch('tolerance', { requestId: 'tol-5', key: 'm23', options: { ...options, samples: 0 } });
    expect(s.ok).toBe(false);
  });
});
