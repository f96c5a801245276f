// Keyboard shortcuts of the common commands. The renderer handles them (the menu only shows them), so they
// behave the same in the app and in the browser harness.
import type { MenuCommand } from '../electron/contract';

export interface KeyPress {
  key: string;
  ctrlKey: boolean;
  metaKey: boolean;
  shiftKey: boolean;
  altKey: boolean;
  /** focus is in a text field: plain keys and undo belong to the field */
  inTextField: boolean;
}

export function shortcutFor(k: KeyPress): MenuCommand | null {
  const mod = k.ctrlKey || k.metaKey;
  const key = k.key.length === 1 ? k.key.toLowerCase() : k.key;
  if (mod && !k.altKey) {
    if (key === 'z' && !k.inTextField) return k.shiftKey ? 'redo' : 'undo';
    if (key === 'y' && !k.inTextField) return 'redo';
    if (key === 's') return k.shiftKey ? 'save-as' : 'save';
    if (key === 'o') return 'open';
    if (key === 'n') return 'new';
    if (key === 'i') return 'import-fold';
    if (key === 'e') return 'export-table';
    if (key === 'Enter') return 'compute-path';
    return null;
  }
  if (k.inTextField || k.altKey) return null;
  if (key === 'Escape') return 'cancel-job';
  if (key === 'f') return 'fit-view';
  if (key === 'g') return 'toggle-ghost';
  if (key === 'l') return 'toggle-labels';
  return null;
}
