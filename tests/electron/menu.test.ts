/** The application menu template (electron/menu.ts): every command reachable, shortcuts unique. */
import { describe, expect, it } from 'vitest';
import type { MenuItemConstructorOptions } from 'electron';
import { MENU_COMMANDS, type MenuCommand } from '../../src/ipc';
import { buildMenuTemplate, type MenuActions } from '../../electron/menu';

function flatten(items: MenuItemConstructorOptions[]): MenuItemConstructorOptions[] {
  return items.flatMap((i) => [i, ...(Array.isArray(i.submenu) ? flatten(i.submenu) : [])]);
}

function recorder(): MenuActions & { log: string[] } {
  const log: string[] = [];
  return {
    log,
    command: (c: MenuCommand, w) => void log.push(`command:${c}:${w ? (w as unknown as { id: number }).id : 'none'}`),
    newWindow: () => void log.push('newWindow'),
    openRecent: (p) => void log.push(`openRecent:${p}`),
    clearRecent: () => void log.push('clearRecent'),
  };
}

function click(item: MenuItemConstructorOptions, window?: unknown): void {
  (item.click as unknown as (i: unknown, w: unknown, e: unknown) => void)(item, window, {});
}

for (const platform of ['darwin', 'win32', 'linux'] as const) {
  describe(`menu on ${platform}`, () => {
    const actions = recorder();
    const template = buildMenuTemplate(actions, { platform, recent: ['/p/a.bqplan', '/q/b.bqplan'], developer: false });
    const items = flatten(template);

    it('sends every MenuCommand to the window it was chosen in', () => {
      actions.log.length = 0;
      for (const item of items) if (item.click && !item.role) click(item, { id: 7 });
      const sent = actions.log.filter((l) => l.startsWith('command:')).map((l) => l.split(':').slice(1, -1).join(':'));
      // `reload` is sent by main's own question about a plan changed on disk, not by a menu item.
      expect([...sent].sort()).toEqual(MENU_COMMANDS.filter((c) => c !== 'reload').sort());
      expect(actions.log.filter((l) => l.startsWith('command:')).every((l) => l.endsWith(':7'))).toBe(true);
    });

    it('has no shortcut twice', () => {
      const accelerators = items.map((i) => i.accelerator).filter((a): a is string => typeof a === 'string');
      expect(new Set(accelerators).size).toBe(accelerators.length);
      expect(accelerators).toContain('CmdOrCtrl+S');
      expect(accelerators).toContain('CmdOrCtrl+Z');
    });

    it('zooms with the built-in roles and lists recent plans, newest first, with Clear', () => {
      const roles = items.map((i) => i.role);
      expect(roles).toEqual(expect.arrayContaining(['zoomIn', 'zoomOut', 'resetZoom', 'copy', 'paste']));
      expect(roles).not.toContain('toggleDevTools');
      expect(roles.includes('appMenu')).toBe(platform === 'darwin');
      const recent = items.find((i) => i.label === 'Open &Recent')!.submenu as MenuItemConstructorOptions[];
      expect(recent[0].label).toMatch(/^a\.bqplan /);
      expect(recent[1].label).toMatch(/^b\.bqplan /);
      actions.log.length = 0;
      click(recent[1]);
      click(recent.at(-1)!);
      expect(actions.log).toEqual(['openRecent:/q/b.bqplan', 'clearRecent']);
    });
  });
}

describe('menu details', () => {
  it('an empty recent list shows a disabled placeholder and a disabled Clear', () => {
    const items = flatten(buildMenuTemplate(recorder(), { platform: 'linux', recent: [], developer: true }));
    const recent = items.find((i) => i.label === 'Open &Recent')!.submenu as MenuItemConstructorOptions[];
    expect(recent[0]).toMatchObject({ label: 'No recent plans', enabled: false });
    expect(recent.at(-1)).toMatchObject({ label: 'Clear Recent', enabled: false });
    expect(items.map((i) => i.role)).toContain('toggleDevTools');
  });
});
