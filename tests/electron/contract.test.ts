// The one contract: every channel is validated on the way in and out, errors are values naming the field,
// and the preload's API is exactly the contract's channels.
import { describe, expect, it } from 'vitest';
import {
  CHANNEL_NAMES,
  channels,
  events,
  finiteOrNull,
  parseEnvelope,
  parseEvent,
  parseRequest,
  parseResponse,
} from '../../electron/contract';
import { API_CHANNELS, createHingeplanApi, type Transport } from '../../electron/bridge';

const source = {
  name: 'v',
  vertices: [[0, 0], [1, 0], [0, 1]] as [number, number][],
  edges: [[0, 1], [1, 2], [2, 0]] as [number, number][],
  assignments: ['B', 'B', 'B'] as ('B')[],
  labels: ['a', null, undefined],
  limits: [null, { min: -1 }, undefined],
};

describe('contract validation', () => {
  it('accepts a well-formed request and normalises nulls from files to undefined', () => {
    const r = parseRequest('pattern:set', { key: 'k', source });
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.value.source.labels).toEqual(['a', undefined, undefined]);
      expect(r.value.source.limits[1]).toEqual({ min: -1 });
    }
  });

  it('rejects a malformed payload with the path of the bad field', () => {
    const r = parseRequest('solve', { requestId: 'x', key: 'k', drives: [{ crease: 'c0', angleDeg: 'forty' }] });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.code).toBe('bad-request');
      expect(r.error.message).toContain('drives.0.angleDeg');
    }
  });

  it('refuses request ids that could smuggle anything but a plain word', () => {
    expect(parseRequest('job:cancel', { requestId: '../etc' }).ok).toBe(false);
    expect(parseRequest('job:cancel', { requestId: 'sweep-12' }).ok).toBe(true);
  });

  it('refuses unknown fields on the empty startup request and unknown channels', () => {
    expect(parseRequest('app:startup', { evil: 1 }).ok).toBe(false);
    expect(parseRequest('nope' as never, {}).ok).toBe(false);
  });

  it('does not let infinity cross: it is sent as null (JSON has no ∞)', () => {
    expect(finiteOrNull(Infinity)).toBeNull();
    expect(finiteOrNull(3)).toBe(3);
    const sol = { anglesDeg: [1], maxResidual: 0, vertexResiduals: [], matchesAssignment: true, localDof: 0, condition: Infinity, signs: '+', sensitivity: [] };
    const res = { status: 'solved', dof: 0, patternDof: 1, solutions: [sol], families: [], search: { complete: true, method: 'closed form', found: 1, note: '' }, messages: [], iterations: 1 };
    expect(parseResponse('solve', { status: 'done', value: res }).ok).toBe(false);
    expect(parseResponse('solve', { status: 'done', value: { ...res, solutions: [{ ...sol, condition: null }] } }).ok).toBe(true);
  });

  it('checks envelopes coming back and passes errors through as values', () => {
    expect(parseEnvelope('job:cancel', { ok: true, value: { cancelled: true } })).toEqual({ ok: true, value: { cancelled: true } });
    expect(parseEnvelope('job:cancel', { ok: false, error: { code: 'x', message: 'y' } })).toEqual({ ok: false, error: { code: 'x', message: 'y' } });
    expect(parseEnvelope('job:cancel', 'garbage')).toMatchObject({ ok: false, error: { code: 'bad-response' } });
    expect(parseEnvelope('job:cancel', { ok: true, value: { cancelled: 'yes' } })).toMatchObject({ ok: false, error: { code: 'bad-response' } });
  });

  it('validates events and drops malformed ones', () => {
    expect(parseEvent('job:progress', { requestId: 'a', done: 1, total: 2 })).toEqual({ requestId: 'a', done: 1, total: 2 });
    expect(parseEvent('job:progress', { requestId: 'a', done: -1, total: 2 })).toBeUndefined();
    expect(parseEvent('menu:command', { command: 'format-disk' })).toBeUndefined();
    expect(Object.keys(events).sort()).toEqual(['job:progress', 'menu:command']);
  });

  it('gives every channel a request and a response schema', () => {
    for (const c of CHANNEL_NAMES) {
      expect(channels[c].request, c).toBeDefined();
      expect(channels[c].response, c).toBeDefined();
    }
  });
});

describe('the preload API', () => {
  function fakeTransport(answer: (channel: string, payload: unknown) => unknown) {
    const calls: [string, unknown][] = [];
    const handlers = new Map<string, (p: unknown) => void>();
    const t: Transport = {
      invoke: async (channel, payload) => {
        calls.push([channel, payload]);
        return answer(channel, payload);
      },
      on: (event, listener) => {
        handlers.set(event, listener);
        return () => handlers.delete(event);
      },
    };
    return { t, calls, handlers };
  }

  it('names one method per channel and nothing else', () => {
    expect(Object.values(API_CHANNELS).sort()).toEqual([...CHANNEL_NAMES].sort());
    const api = createHingeplanApi(fakeTransport(() => null).t);
    expect(Object.keys(api).sort()).toEqual([...Object.keys(API_CHANNELS), 'onMenuCommand', 'onProgress'].sort());
    expect(Object.isFrozen(api)).toBe(true);
  });

  it('does not send a request that breaks the contract', async () => {
    const { t, calls } = fakeTransport(() => ({ ok: true, value: { cancelled: true } }));
    const api = createHingeplanApi(t);
    const bad = await api.cancelJob({ requestId: 'has space' });
    expect(bad.ok).toBe(false);
    expect(calls).toEqual([]);
    expect(await api.cancelJob({ requestId: 'ok-1' })).toEqual({ ok: true, value: { cancelled: true } });
    expect(calls).toEqual([['job:cancel', { requestId: 'ok-1' }]]);
  });

  it('turns a failed transport and a malformed answer into error values', async () => {
    const api = createHingeplanApi(
      fakeTransport((c) => {
        if (c === 'clipboard:write') throw new Error('pipe closed');
        return { ok: true, value: { wrong: 1 } };
      }).t,
    );
    expect(await api.copyText({ text: 'x' })).toMatchObject({ ok: false, error: { code: 'ipc-failed' } });
    expect(await api.cancelJob({ requestId: 'a' })).toMatchObject({ ok: false, error: { code: 'bad-response' } });
  });

  it('delivers only well-formed progress events to the page', () => {
    const { t, handlers } = fakeTransport(() => null);
    const api = createHingeplanApi(t);
    const got: unknown[] = [];
    const off = api.onProgress((e) => got.push(e));
    handlers.get('job:progress')!({ requestId: 'a', done: 2, total: 4 });
    handlers.get('job:progress')!({ requestId: 'a', done: 'two' });
    expect(got).toEqual([{ requestId: 'a', done: 2, total: 4 }]);
    off();
    expect(handlers.has('job:progress')).toBe(false);
  });
});
