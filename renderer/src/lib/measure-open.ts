/**
 * The Open Measurement command: a file chooser for measurement files. In the browser and in
 * Electron alike it is the page's own file input (Electron shows the system's dialog for it); the
 * input is the one `MeasurementList` renders, registered here so the menu and keys reach it.
 */
import { importMeasurementBlob } from './measure-actions';

let input: HTMLInputElement | null = null;

/** Registers the file input; returns the function that unregisters it. */
export function registerMeasurementInput(el: HTMLInputElement): () => void {
  input = el;
  return () => {
    if (input === el) input = null;
  };
}

/** Shows the file chooser. */
export function openMeasurementDialog(): void {
  input?.click();
}

/** Imports the files a file input or a drop gives, one after the other; the last one's panel stays open. */
export async function importMeasurementFiles(files: Iterable<File>): Promise<void> {
  for (const f of files) await importMeasurementBlob(f);
}
