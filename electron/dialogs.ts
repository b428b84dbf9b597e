/**
 * The native dialogs main shows: open a plan, save a plan, save an export, and the close prompt.
 * Each returns plain values (a path or null, an answer), so the flows that use them read as code.
 */
import { dialog, type BrowserWindow, type OpenDialogOptions, type SaveDialogOptions } from 'electron';
import type { PromptAnswer } from './close-flow';
import { APP_NAME } from './title';

export const PLAN_FILTERS = [{ name: 'Biquadrant plan', extensions: ['bqplan'] }];

/** The chosen plan file, or null when cancelled. With no window (macOS, all closed) the dialog is free-standing. */
export async function showOpenPlanDialog(win: BrowserWindow | undefined): Promise<string | null> {
  const options: OpenDialogOptions = { title: 'Open plan', filters: PLAN_FILTERS, properties: ['openFile'] };
  const result = win ? await dialog.showOpenDialog(win, options) : await dialog.showOpenDialog(options);
  return result.canceled || result.filePaths.length === 0 ? null : result.filePaths[0];
}

export const MEASUREMENT_FILTERS = [
  { name: 'Measurement (text columns, WAV impulse response)', extensions: ['txt', 'csv', 'frd', 'dat', 'wav', 'wave'] },
  { name: 'All files', extensions: ['*'] },
];

/** The chosen measurement file, or null when cancelled. */
export async function showOpenMeasurementDialog(win: BrowserWindow): Promise<string | null> {
  const result = await dialog.showOpenDialog(win, { title: 'Open measurement', filters: MEASUREMENT_FILTERS, properties: ['openFile'] });
  return result.canceled || result.filePaths.length === 0 ? null : result.filePaths[0];
}

/** Where to save a plan, or null when cancelled. */
export async function showSavePlanDialog(win: BrowserWindow, defaultPath: string): Promise<string | null> {
  const options: SaveDialogOptions = {
    title: 'Save plan',
    defaultPath,
    filters: PLAN_FILTERS,
    properties: ['createDirectory', 'showOverwriteConfirmation'],
  };
  const result = await dialog.showSaveDialog(win, options);
  return result.canceled || !result.filePath ? null : result.filePath;
}

/** Where to save an export, or null when cancelled. */
export async function showExportDialog(win: BrowserWindow, defaultPath: string, extensions: string[]): Promise<string | null> {
  const result = await dialog.showSaveDialog(win, {
    title: 'Export',
    defaultPath,
    filters: [{ name: 'Export', extensions }],
    properties: ['createDirectory', 'showOverwriteConfirmation'],
  });
  return result.canceled || !result.filePath ? null : result.filePath;
}

/** The close prompt of a window with unsaved changes to `label`. */
export async function askSaveBeforeClose(win: BrowserWindow, label: string): Promise<PromptAnswer> {
  win.focus();
  const { response } = await dialog.showMessageBox(win, {
    type: 'warning',
    buttons: ['Save', "Don't Save", 'Cancel'],
    defaultId: 0,
    cancelId: 2,
    noLink: true,
    title: APP_NAME,
    message: `Save the changes to "${label}" before closing?`,
    detail: 'If you do not save, your changes since the last save are lost.',
  });
  return response === 0 ? 'save' : response === 1 ? 'discard' : 'cancel';
}

/** A plan name as a file name: no characters a file system refuses, at most 80 characters. */
export function safeFileStem(name: string): string {
  const stem = name.replace(/[\u0000-\u001f<>:"/\\|?*]+/g, ' ').replace(/\s+/g, ' ').trim().slice(0, 80);
  return stem || 'plan';
}
