/**
 * The application menu, as a template. Only Electron's types are imported (erased at build), so
 * the template is plain data and its tests run without Electron.
 *
 * Document commands (New, Open, Save, Undo, view switching...) go to the focused window's
 * renderer as a `MenuCommand`; the renderer owns the document. Zoom, clipboard and window
 * commands use Electron's built-in roles. Open Recent opens the plan in its own window (one
 * window per plan), or focuses the window that already shows it.
 */
import type { BaseWindow, MenuItemConstructorOptions } from 'electron';
import { basename, dirname } from 'node:path';
import type { MenuCommand } from '../src/ipc';

export interface MenuActions {
  /** A document command for `window` (the focused window; undefined when none is, e.g. macOS with all windows closed). */
  command(command: MenuCommand, window: BaseWindow | undefined): void;
  newWindow(): void;
  openRecent(path: string): void;
  clearRecent(): void;
}

export interface MenuOptions {
  platform: NodeJS.Platform;
  recent: readonly string[];
  /** Adds the developer tools toggle (not in a packaged build). */
  developer: boolean;
}

function commandItem(
  actions: MenuActions,
  label: string,
  command: MenuCommand,
  accelerator?: string,
): MenuItemConstructorOptions {
  return { label, accelerator, click: (_item, window) => actions.command(command, window) };
}

export function recentLabel(path: string): string {
  return `${basename(path)}  (${dirname(path)})`;
}

export function buildMenuTemplate(actions: MenuActions, options: MenuOptions): MenuItemConstructorOptions[] {
  const mac = options.platform === 'darwin';
  const recentItems: MenuItemConstructorOptions[] =
    options.recent.length === 0
      ? [{ label: 'No recent plans', enabled: false }]
      : options.recent.map((path) => ({ label: recentLabel(path), click: () => actions.openRecent(path) }));

  const file: MenuItemConstructorOptions = {
    label: '&File',
    submenu: [
      commandItem(actions, '&New Plan', 'new', 'CmdOrCtrl+N'),
      { label: 'New &Window', accelerator: 'CmdOrCtrl+Shift+N', click: () => actions.newWindow() },
      commandItem(actions, '&Open…', 'open', 'CmdOrCtrl+O'),
      {
        label: 'Open &Recent',
        submenu: [
          ...recentItems,
          { type: 'separator' },
          { label: 'Clear Recent', enabled: options.recent.length > 0, click: () => actions.clearRecent() },
        ],
      },
      { type: 'separator' },
      commandItem(actions, '&Save', 'save', 'CmdOrCtrl+S'),
      commandItem(actions, 'Save &As…', 'saveAs', 'CmdOrCtrl+Shift+S'),
      commandItem(actions, 'Re&vert to Saved', 'revert'),
      { type: 'separator' },
      commandItem(actions, '&Export Coefficients…', 'export', 'CmdOrCtrl+E'),
      { type: 'separator' },
      { role: 'close', label: '&Close Window' },
      ...(mac ? [] : [{ type: 'separator' } as MenuItemConstructorOptions, { role: 'quit', label: 'E&xit' } as MenuItemConstructorOptions]),
    ],
  };

  const edit: MenuItemConstructorOptions = {
    label: '&Edit',
    submenu: [
      // Not the `undo`/`redo` roles: the renderer keeps the plan's history (and decides whether
      // a focused text field gets the keystroke instead).
      commandItem(actions, '&Undo', 'undo', 'CmdOrCtrl+Z'),
      commandItem(actions, '&Redo', 'redo', mac ? 'Cmd+Shift+Z' : 'Ctrl+Y'),
      { type: 'separator' },
      { role: 'cut' },
      { role: 'copy' },
      { role: 'paste' },
      { role: 'selectAll' },
    ],
  };

  const view: MenuItemConstructorOptions = {
    label: '&View',
    submenu: [
      commandItem(actions, '&Response', 'view:response', 'CmdOrCtrl+1'),
      commandItem(actions, '&Z-plane', 'view:zplane', 'CmdOrCtrl+2'),
      commandItem(actions, '&Time', 'view:time', 'CmdOrCtrl+3'),
      commandItem(actions, 'E&xport', 'view:export', 'CmdOrCtrl+4'),
      { type: 'separator' },
      { role: 'zoomIn' },
      { role: 'zoomOut' },
      { role: 'resetZoom' },
      { type: 'separator' },
      { role: 'togglefullscreen' },
      ...(options.developer ? [{ type: 'separator' } as MenuItemConstructorOptions, { role: 'toggleDevTools' } as MenuItemConstructorOptions] : []),
    ],
  };

  const template: MenuItemConstructorOptions[] = [];
  if (mac) template.push({ role: 'appMenu' });
  template.push(file, edit, view);
  if (mac) template.push({ role: 'windowMenu' });
  return template;
}
