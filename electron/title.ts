/**
 * The window title: the plan's name, its file, and a marker while there are unsaved changes.
 *
 * Plain Node. `• Two-way monitor — monitor.bqplan — Biquadrant`. The marker comes first so it
 * stays visible when a taskbar cuts the title short. macOS also gets the native edited dot
 * (`setDocumentEdited`) and the file as the represented file.
 */
import { basename } from 'node:path';

export const APP_NAME = 'Biquadrant';
export const DIRTY_MARKER = '\u2022 ';
export const UNTITLED = 'Untitled plan';

export interface TitleParts {
  /** The plan's name as the renderer reports it. */
  name: string;
  path: string | null;
  dirty: boolean;
}

export function windowTitle({ name, path, dirty }: TitleParts): string {
  const plan = name.trim() || UNTITLED;
  const file = path ? basename(path) : 'not saved';
  return `${dirty ? DIRTY_MARKER : ''}${plan} \u2014 ${file} \u2014 ${APP_NAME}`;
}

/** The name used in prompts ("Save changes to ... ?"): the file name, else the plan name. */
export function documentLabel({ name, path }: Omit<TitleParts, 'dirty'>): string {
  return path ? basename(path) : name.trim() || UNTITLED;
}
