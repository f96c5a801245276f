// The application menu as plain data. Menu items only send a command to the renderer, which owns the
// document and its keyboard shortcuts; accelerators are shown but not registered, so a key press is handled
// once, by the renderer, the same way in the app and in the e2e harness.

import type { MenuItemConstructorOptions } from 'electron';
import type { MenuCommand } from './contract';

export interface MenuHooks {
  send(command: MenuCommand, path?: string): void;
  recent: { path: string; name: string }[];
  platform: NodeJS.Platform;
  /** offer the developer tools (builds run from source only) */
  devTools: boolean;
  /** opens the folder of recovery copies, help, ... handled by the main process itself */
  quit(): void;
}

export function menuTemplate(hooks: MenuHooks): MenuItemConstructorOptions[] {
  const item = (label: string, command: MenuCommand, accelerator?: string): MenuItemConstructorOptions => ({
    label,
    accelerator,
    registerAccelerator: false,
    click: () => hooks.send(command),
  });
  const recent: MenuItemConstructorOptions[] = hooks.recent.length
    ? hooks.recent.map((r) => ({ label: r.name, toolTip: r.path, click: () => hooks.send('open-recent', r.path) }))
    : [{ label: 'No recent files', enabled: false }];
  const isMac = hooks.platform === 'darwin';
  const template: MenuItemConstructorOptions[] = [
    {
      label: 'File',
      submenu: [
        item('New from generator…', 'new', 'CmdOrCtrl+N'),
        item('Open…', 'open', 'CmdOrCtrl+O'),
        { label: 'Open recent', submenu: recent },
        item('Import FOLD…', 'import-fold', 'CmdOrCtrl+I'),
        item('Import drawing (DXF or SVG)…', 'import-drawing'),
        { type: 'separator' },
        item('Save', 'save', 'CmdOrCtrl+S'),
        item('Save as…', 'save-as', 'CmdOrCtrl+Shift+S'),
        { type: 'separator' },
        item('Export FOLD…', 'export-fold'),
        item('Export flat pattern as DXF…', 'export-dxf'),
        item('Export flat pattern as SVG…', 'export-svg'),
        item('Export shape as OBJ…', 'export-obj'),
        item('Export shape as STL…', 'export-stl'),
        item('Export angle table or schedule…', 'export-table', 'CmdOrCtrl+E'),
        { type: 'separator' },
        isMac ? { role: 'close' } : { label: 'Quit', accelerator: 'CmdOrCtrl+Q', click: () => hooks.quit() },
      ],
    },
    {
      label: 'Edit',
      submenu: [
        item('Undo', 'undo', 'CmdOrCtrl+Z'),
        item('Redo', 'redo', 'CmdOrCtrl+Shift+Z'),
        { type: 'separator' },
        { role: 'cut' },
        { role: 'copy' },
        { role: 'paste' },
        { role: 'selectAll' },
      ],
    },
    {
      label: 'Fold',
      submenu: [
        item('Compute path of the drive', 'compute-path', 'CmdOrCtrl+Enter'),
        item('Cancel running job', 'cancel-job', 'Escape'),
      ],
    },
    {
      label: 'View',
      submenu: [
        item('Fit shape to view', 'fit-view', 'F'),
        item('Show flat sheet behind shape', 'toggle-ghost', 'G'),
        item('Show hinge labels', 'toggle-labels', 'L'),
        { type: 'separator' },
        { role: 'resetZoom' },
        { role: 'zoomIn' },
        { role: 'zoomOut' },
        ...(hooks.devTools ? [{ type: 'separator' } as const, { role: 'toggleDevTools' } as const] : []),
      ],
    },
  ];
  if (isMac) template.unshift({ role: 'appMenu' });
  return template;
}
