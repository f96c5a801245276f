// The tolerance analysis in the interface state: the last request and its result, progress while it runs,
// and which hinges the fan charts show. Plain data, changed only by the pure reducer below.

import type { ToleranceOptionsDto, ToleranceResultDto } from '../../electron/contract';
import type { JobStatus } from './app';

export interface ToleranceState {
  status: JobStatus;
  requestId?: string;
  progress?: { done: number; total: number };
  /** what was asked for (the form shows it again) */
  request?: ToleranceOptionsDto;
  result?: ToleranceResultDto;
  error?: string;
  /** creases whose fan charts are shown (crease indices); empty: the widest few */
  chosen: number[];
}

export const initialTolerance: ToleranceState = { status: 'idle', chosen: [] };

export type ToleranceAction =
  | { type: 'tolerance-started'; requestId: string; request: ToleranceOptionsDto }
  | { type: 'tolerance-progress'; requestId: string; done: number; total: number }
  | { type: 'tolerance-finished'; requestId: string; result: ToleranceResultDto }
  | { type: 'tolerance-stopped'; requestId: string; status: 'cancelled' | 'error'; error?: string }
  | { type: 'tolerance-choose'; creases: number[] };

export function toleranceReducer(state: ToleranceState, action: ToleranceAction): ToleranceState {
  switch (action.type) {
    case 'tolerance-started':
      return { ...state, status: 'running', requestId: action.requestId, request: action.request, progress: { done: 0, total: action.request.samples }, error: undefined };
    case 'tolerance-progress':
      if (state.requestId !== action.requestId || state.status !== 'running') return state;
      return { ...state, progress: { done: action.done, total: action.total } };
    case 'tolerance-finished':
      if (state.requestId !== action.requestId) return state;
      return { ...state, status: 'done', result: action.result, progress: undefined };
    case 'tolerance-stopped':
      if (state.requestId !== action.requestId) return state;
      return { ...state, status: action.status, error: action.error, progress: undefined };
    case 'tolerance-choose':
      return { ...state, chosen: action.creases };
  }
}

/** How wide a hinge spreads over the whole path: its largest p95 − p05, degrees. */
export function spreadWidth(h: ToleranceResultDto['hinges'][number]): number {
  let w = 0;
  h.p05Deg.forEach((lo, j) => {
    const hi = h.p95Deg[j];
    if (lo !== null && hi !== null) w = Math.max(w, hi - lo);
  });
  return w;
}

/**
 * The hinges the fan charts show: the chosen ones that the result has, else the crease selected on the sheet
 * and the widest others, `count` in all.
 */
export function shownHinges(result: ToleranceResultDto, chosen: number[], selectedCrease: number | null, count = 3): ToleranceResultDto['hinges'] {
  const byCrease = new Map(result.hinges.map((h) => [h.crease, h]));
  const picked = chosen.map((c) => byCrease.get(c)).filter((h): h is NonNullable<typeof h> => !!h);
  if (picked.length) return picked;
  const out: ToleranceResultDto['hinges'] = [];
  const sel = selectedCrease !== null ? byCrease.get(selectedCrease) : undefined;
  if (sel) out.push(sel);
  const widest = [...result.hinges].sort((a, b) => spreadWidth(b) - spreadWidth(a) || a.crease - b.crease);
  for (const h of widest) {
    if (out.length >= count) break;
    if (!out.includes(h)) out.push(h);
  }
  return out;
}
