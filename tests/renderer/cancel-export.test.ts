// "Cancel running job" (Escape, or the Fold menu) stops an export being written, not only a path: the
// export goes out with a request id of its own and the cancel names it.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { createHingeplanApi, type Transport } from '../../electron/bridge';
import { createJobs } from '../../electron/job-table';
import { Controller } from '../../renderer/controller';
import { createStore } from '../../renderer/state/store';
import type { ProjectDto } from '../../electron/contract';

const couponText = readFileSync(path.join(__dirname, '..', '..', 'samples', 'hinge-coupon.hingeplan.json'), 'utf8');

describe('cancelling an export', () => {
  it('sends the export with a request id and cancels that id on cancel-job', async () => {
    const jobs = createJobs();
    const ctx = { progress() {}, shouldStop: () => false };
    const cancels: string[] = [];
    let exportId: string | undefined;
    let finishExport: ((v: unknown) => void) | undefined;
    const t: Transport = {
      async invoke(channel, payload) {
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
          case 'doc:export':
            exportId = p.requestId as string;
            // an export that runs until it is cancelled
            return new Promise((resolve) => (finishExport = resolve));
          case 'job:cancel':
            cancels.push(p.requestId as string);
            if (p.requestId === exportId) finishExport?.(ok({ status: 'canceled' }));
            return ok({ cancelled: p.requestId === exportId });
          default:
            return ok({ ok: true });
        }
      },
      on: () => () => {},
    };
    const controller = new Controller(createHingeplanApi(t), createStore());
    controller.start();
    await controller.startup();
    const exporting = controller.exportFile('fold', {});
    for (let i = 0; i < 100 && !exportId; i++) await new Promise((r) => setTimeout(r, 5));
    expect(exportId).toMatch(/^export-/);
    await controller.command('cancel-job');
    expect(cancels).toEqual([exportId]);
    expect(await exporting).toBeNull();
    // once it has ended there is nothing of it left to cancel
    await controller.command('cancel-job');
    expect(cancels).toEqual([exportId]);
    controller.stop();
  });
});
