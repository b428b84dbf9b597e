/**
 * The Open Measurement command: a file chooser for measurement files. The menu's command goes
 * through the host (Electron: main's open dialog, which reads the file; browser: a file picker);
 * the list's button uses its own file input, which a click may open anywhere.
 */
import type { Host } from '../host/host';
import { importMeasurementBlob, importMeasurementFile } from './measure-actions';
import { viewState as view } from '../state/view.svelte';

let input: HTMLInputElement | null = null;

/** Registers the file input; returns the function that unregisters it. */
export function registerMeasurementInput(el: HTMLInputElement): () => void {
  input = el;
  return () => {
    if (input === el) input = null;
  };
}

/** Shows the host's file chooser and imports the chosen file (the import panel shows the outcome). */
export async function openMeasurementDialog(host: Host | null): Promise<void> {
  if (!host) return void input?.click();
  const r = await host.openMeasurement();
  if (r.ok) importMeasurementFile(r.value.fileName, r.value.bytes);
  else if ('error' in r) view.notify('error', r.error);
}

/** Imports the files a file input or a drop gives, one after the other; the last one's panel stays open. */
export async function importMeasurementFiles(files: Iterable<File>): Promise<void> {
  for (const f of files) await importMeasurementBlob(f);
}
