// The application menu only sends commands of the contract; its shortcuts are shown but handled by the
// renderer (so a key press is acted on once).
import { describe, expect, it } from 'vitest';
import type { MenuItemConstructorOptions } from 'electron';
import { menuTemplate } from '../../electron/menu';
import { MenuCommandSchema } from '../../electron/contract';
import { shortcutFor } from '../../renderer/shortcuts';

function items(t: MenuItemConstructorOptions[]): MenuItemConstructorOptions[] {
  return t.flatMap((i) => [i, ...(Array.isArray(i.submenu) ? items(i.submenu) : [])]);
}

describe('application menu', () => {
  const sent: [string, string | undefined][] = [];
  const template = menuTemplate({ send: (c, p) => sent.push([c, p]), recent: [{ path: '/w/a.hingeplan.json', name: 'a.hingeplan.json' }], platform: 'linux', devTools: true, quit: () => sent.push(['quit', undefined]) });
  const all = items(template);

  it('offers the developer tools only in a build run from source', () => {
    expect(all.some((i) => i.role === 'toggleDevTools')).toBe(true);
    const packaged = items(menuTemplate({ send: () => undefined, recent: [], platform: 'linux', devTools: false, quit: () => undefined }));
    expect(packaged.some((i) => i.role === 'toggleDevTools')).toBe(false);
  });

  it('sends only commands the contract knows', () => {
    for (const i of all) if (i.click && i.label !== 'Quit') (i.click as () => void)();
    expect(sent.length).toBeGreaterThan(10);
    for (const [c] of sent) if (c !== 'quit') expect(MenuCommandSchema.safeParse(c).success, c).toBe(true);
    expect(sent).toContainEqual(['open-recent', '/w/a.hingeplan.json']);
  });

  it('shows shortcuts without registering them, and the renderer maps the same keys', () => {
    const withKeys = all.filter((i) => i.accelerator && !i.role && i.label !== 'Quit');
    expect(withKeys.length).toBeGreaterThan(5);
    for (const i of withKeys) expect(i.registerAccelerator, i.label).toBe(false);
    const press = (key: string, mod: boolean, shift = false) => shortcutFor({ key, ctrlKey: mod, metaKey: false, shiftKey: shift, altKey: false, inTextField: false });
    expect(press('s', true)).toBe('save');
    expect(press('S', true, true)).toBe('save-as');
    expect(press('z', true)).toBe('undo');
    expect(press('Z', true, true)).toBe('redo');
    expect(press('o', true)).toBe('open');
    expect(press('e', true)).toBe('export-table');
    expect(press('Escape', false)).toBe('cancel-job');
  });

  it('leaves undo and plain keys to a text field that has the focus', () => {
    expect(shortcutFor({ key: 'z', ctrlKey: true, metaKey: false, shiftKey: false, altKey: false, inTextField: true })).toBeNull();
    expect(shortcutFor({ key: 'f', ctrlKey: false, metaKey: false, shiftKey: false, altKey: false, inTextField: true })).toBeNull();
    expect(shortcutFor({ key: 's', ctrlKey: true, metaKey: false, shiftKey: false, altKey: false, inTextField: true })).toBe('save');
  });
});
