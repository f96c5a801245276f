// Undo as a stack of documents. Documents are immutable plain data, so keeping the old ones costs only
// what an edit changed. Edits with the same coalesce key in a row (one slider drag) make one undo step.

export interface History<T> {
  past: T[];
  present: T;
  future: T[];
  /** key of the edit that made `present`; a following edit with the same key replaces it */
  coalesceKey?: string;
}

export const HISTORY_LIMIT = 200;

export function startHistory<T>(present: T): History<T> {
  return { past: [], present, future: [] };
}

export function commit<T>(h: History<T>, next: T, coalesceKey?: string): History<T> {
  if (next === h.present) return h;
  if (coalesceKey !== undefined && coalesceKey === h.coalesceKey) {
    return { past: h.past, present: next, future: [], coalesceKey };
  }
  const past = [...h.past, h.present];
  if (past.length > HISTORY_LIMIT) past.splice(0, past.length - HISTORY_LIMIT);
  return { past, present: next, future: [], coalesceKey };
}

/** Ends a run of coalesced edits, so the next edit starts a new undo step. */
export function seal<T>(h: History<T>): History<T> {
  return h.coalesceKey === undefined ? h : { ...h, coalesceKey: undefined };
}

export function undo<T>(h: History<T>): History<T> {
  if (!h.past.length) return h;
  return { past: h.past.slice(0, -1), present: h.past[h.past.length - 1], future: [h.present, ...h.future] };
}

export function redo<T>(h: History<T>): History<T> {
  if (!h.future.length) return h;
  return { past: [...h.past, h.present], present: h.future[0], future: h.future.slice(1) };
}

export const canUndo = <T>(h: History<T>): boolean => h.past.length > 0;
export const canRedo = <T>(h: History<T>): boolean => h.future.length > 0;
