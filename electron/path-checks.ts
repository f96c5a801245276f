// The checks a path request from the window asks for: panel contact (on unless turned off, with its
// clearance) and, when the document has loads, the drives' holding torque.
import type { z } from 'zod';
import type { Message, Pattern } from '../solver/types';
import { PathChecks } from '../solver/outputs/path-physics';
import { LoadModel, resolveLoads } from '../solver/outputs/torque';
import type { SweepOptionsSchema } from './contract';

/** The checks a sweep request asks for: contact (default on) and, with loads, torque. */
export function pathChecks(pattern: Pattern, o: z.output<typeof SweepOptionsSchema>, drive: number, holds: { crease: number; value: number }[]): { checks?: PathChecks; messages: Message[] } {
  const r = resolveLoads(pattern, o.loads, {});
  let loads: LoadModel | undefined;
  const messages: Message[] = [...r.messages];
  if (r.asked && !r.messages.length) {
    const m = LoadModel.create(pattern, r.spec, o.units);
    // a file whose units do not say a length gets no torque, with the reason among the path's messages
    if (m.model) loads = m.model; else messages.push(...m.messages.map((x) => ({ ...x, severity: 'warning' as const })));
  }
  if (!o.contact && !loads) return { messages };
  return { checks: new PathChecks(pattern, drive, holds, { contact: o.contact ? { clearance: o.clearance } : false, ...(loads ? { loads } : {}), ...(o.units ? { units: o.units } : {}) }), messages };
}

