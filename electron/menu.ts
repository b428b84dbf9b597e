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
import { accelerator, commandSpec, type MenuCommand } from '../src/ipc';

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

/** A document command's item: label and accelerator from the command table (src/ipc.ts). */
function commandItem(actions: MenuActions, command: MenuCommand, mac: boolean): MenuItemConstructorOptions {
  return { label: commandSpec(command).label, accelerator: accelerator(command, mac), click: (_item, window) => actions.command(command, window) };
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
      commandItem(actions, 'new', mac),
      { label: 'New &Window', accelerator: 'CmdOrCtrl+Shift+N', click: () => actions.newWindow() },
      commandItem(actions, 'open', mac),
      commandItem(actions, 'openMeasurement', mac),
      {
        label: 'Open &Recent',
        submenu: [
          ...recentItems,
          { type: 'separator' },
          { label: 'Clear Recent', enabled: options.recent.length > 0, click: () => actions.clearRecent() },
        ],
      },
      { type: 'separator' },
      commandItem(actions, 'save', mac),
      commandItem(actions, 'saveAs', mac),
      commandItem(actions, 'revert', mac),
      { type: 'separator' },
      commandItem(actions, 'export', mac),
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
      commandItem(actions, 'undo', mac),
      commandItem(actions, 'redo', mac),
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
      commandItem(actions, 'view:response', mac),
      commandItem(actions, 'view:zplane', mac),
      commandItem(actions, 'view:time', mac),
      commandItem(actions, 'view:export', mac),
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
