/**
 * What the user's commands do: band nudges and drags, band and output management, and file
 * commands through the host adapter. Components and keyboard shortcuts call these; each edit
 * goes through the plan reader (src/ui/edits) and the document's undo history.
 */
import { DRAG_TOP_FRACTION } from '$core/analysis/thresholds';
import { BAND_PARAMETERS, DEFAULT_Q } from '$core/design/cookbook';
import type { Band, Plan } from '$core/plan/types';
import type { PlanDocument } from '$core/ipc';
import { tick } from 'svelte';
import * as edits from '$core/ui/edits';
import { INPUT, type ChainRef } from '$core/ui/edits';
import { roundFrequency, roundGain, roundQ } from '$core/ui/units';
import type { Host } from '../host/host';
import { BAND_TYPE_LABEL } from './labels';
import { diagnosticText } from './diagnostics';
import { documentState as doc } from '../state/document.svelte';
import { pendingEdits } from './pending.svelte';
import { viewState as view } from '../state/view.svelte';

/** Applies an edit result; a refusal becomes the notice. Returns true when applied. */
export function commit(result: edits.EditResult, coalesce?: string): boolean {
  const refused = doc.apply(result, { coalesce });
  if (refused !== null) {
    view.notify('error', diagnosticText(doc.plan, refused));
    return false;
  }
  return true;
}

export function selectedChain(): ChainRef {
  return view.chainIn(doc.plan);
}

export function selectedBand(): Band | null {
  const id = view.bandIn(doc.plan);
  if (!id) return null;
  return edits.chainBands(doc.plan, selectedChain()).find((b) => b.id === id) ?? null;
}

/** Rounded, and kept just inside Nyquist so the plan reader accepts it. */
function clampFrequency(plan: Plan, f: number): number {
  const r = roundFrequency(Math.max(1, f));
  return r < plan.sampleRate / 2 ? r : Math.floor(plan.sampleRate * DRAG_TOP_FRACTION);
}

/** Frequency, gain and Q of a band moved together (drag, wheel, nudge); fields a type lacks are left alone. */
export function moveBand(chain: ChainRef, start: Band, change: { freqRatio?: number; deltaDb?: number; qRatio?: number }, coalesce?: string): boolean {
  const p = BAND_PARAMETERS[start.type];
  const patch: Partial<Band> = {};
  if (change.freqRatio !== undefined && change.freqRatio !== 1 && start.type !== 'raw') patch.frequency = clampFrequency(doc.plan, start.frequency * change.freqRatio);
  if (change.deltaDb !== undefined && change.deltaDb !== 0 && p.gain) patch.gainDb = Math.max(-60, Math.min(60, roundGain((start.gainDb ?? 0) + change.deltaDb)));
  if (change.qRatio !== undefined && change.qRatio !== 1) {
    if (p.q && (start.q !== undefined || !p.slope)) patch.q = Math.max(0.01, Math.min(1000, roundQ((start.q ?? DEFAULT_Q) * change.qRatio)));
    else if (p.slope) patch.slope = Math.max(0.05, roundQ((start.slope ?? 1) * change.qRatio));
  }
  if (Object.keys(patch).length === 0) return false;
  const r = edits.updateBand(doc.plan, chain, start.id, patch);
  if (!r.ok && patch.slope !== undefined) return false; // a shelf slope past its limit: stay put quietly
  return commit(r, coalesce);
}

// ---- band drag (one undo step per drag) -------------------------------------------------------

let dragStart: { chain: ChainRef; band: Band } | null = null;

export function beginBandDrag(bandId: string): void {
  const chain = selectedChain();
  const band = edits.chainBands(doc.plan, chain).find((b) => b.id === bandId);
  view.selectBand(bandId);
  if (!band) return;
  dragStart = { chain, band };
  doc.beginGesture();
}

export function dragBand(d: { freqRatio: number; deltaDb: number; qRatio: number }): void {
  if (!dragStart) return;
  const { chain, band } = dragStart;
  const p = BAND_PARAMETERS[band.type];
  const patch: Partial<Band> = {};
  if (band.type !== 'raw') patch.frequency = clampFrequency(doc.plan, band.frequency * d.freqRatio);
  if (p.gain) patch.gainDb = Math.max(-60, Math.min(60, roundGain((band.gainDb ?? 0) + d.deltaDb)));
  if (d.qRatio !== 1 && p.q && (band.q !== undefined || !p.slope)) patch.q = Math.max(0.01, Math.min(1000, roundQ((band.q ?? DEFAULT_Q) * d.qRatio)));
  const r = edits.updateBand(doc.plan, chain, band.id, patch);
  if (r.ok) doc.apply(r);
}

export function endBandDrag(): void {
  dragStart = null;
  doc.endGesture();
}

// ---- keyboard nudges (frequency 1/24 octave, gain 0.1 dB, Q 5 %; larger with Shift) ----

export function nudgeSelected(what: 'frequency' | 'gain' | 'q', direction: 1 | -1, large: boolean): void {
  const band = selectedBand();
  if (!band) {
    view.notify('info', 'Select a band first (click its number on the plot or in the list).');
    return;
  }
  const chain = selectedChain();
  const key = `nudge:${chain}/${band.id}/${what}`;
  if (what === 'frequency') moveBand(chain, band, { freqRatio: Math.pow(2, (direction * (large ? 8 : 1)) / 24) }, key);
  else if (what === 'gain') {
    if (!BAND_PARAMETERS[band.type].gain) return view.notify('info', `${BAND_TYPE_LABEL[band.type]}: this band type has no gain.`);
    moveBand(chain, band, { deltaDb: direction * (large ? 1 : 0.1) }, key);
  } else {
    const p = BAND_PARAMETERS[band.type];
    if (!p.q && !p.slope) return view.notify('info', band.type === 'raw' ? 'Raw coefficients have no Q: type them in the band editor.' : `${BAND_TYPE_LABEL[band.type]}: this band type has no Q.`);
    moveBand(chain, band, { qRatio: Math.pow(large ? 1.25 : 1.05, direction) }, key);
  }
}

// ---- bands and outputs ------------------------------------------------------------------------

export function addBandToSelected(init?: Partial<Band>): void {
  const chain = selectedChain();
  const r = edits.addBand(doc.plan, chain, init);
  if (commit(r) && r.ok && r.bandId) view.select(chain, r.bandId);
}

/**
 * Removes the selected band (any view) and selects the one that took its place. Focus stays where
 * it was when that is still on the page (the plot: the keys go on to the next band); when it was
 * on something the delete took away (the band's own remove button) or on nothing, it goes to the
 * newly selected band's row in the list, or to "+ Band" when the chain is empty.
 */
export function removeSelectedBand(): void {
  const band = selectedBand();
  if (!band) return;
  const chain = selectedChain();
  const bands = edits.chainBands(doc.plan, chain);
  const i = bands.findIndex((b) => b.id === band.id);
  if (commit(edits.removeBand(doc.plan, chain, band.id))) {
    const rest = edits.chainBands(doc.plan, chain);
    const next = rest[Math.min(i, rest.length - 1)]?.id ?? null;
    view.select(chain, next);
    void tick().then(() => settleFocus(next));
  }
}

function settleFocus(bandId: string | null): void {
  if (typeof document === 'undefined') return;
  const active = document.activeElement;
  if (active && active !== document.body && active.isConnected) return;
  // Compared by value rather than by a selector, so no id needs escaping (and no CSS.escape is needed).
  const row = bandId ? ([...document.querySelectorAll<HTMLElement>('[data-testid="band-row"]')].find((r) => r.dataset.band === bandId) ?? null) : null;
  (row ?? document.querySelector<HTMLElement>('[data-testid="band-add"]'))?.focus();
}

export function addOutput(): void {
  const r = edits.addOutput(doc.plan);
  if (commit(r) && r.ok && r.outputId) view.select(r.outputId);
}

export function duplicateSelectedOutput(): void {
  const chain = selectedChain();
  if (chain === INPUT) return;
  const r = edits.duplicateOutput(doc.plan, chain);
  if (commit(r) && r.ok && r.outputId) view.select(r.outputId);
}

export function removeSelectedOutput(): void {
  const chain = selectedChain();
  if (chain === INPUT) return;
  const i = doc.plan.outputs.findIndex((o) => o.id === chain);
  if (commit(edits.removeOutput(doc.plan, chain))) view.select(doc.plan.outputs[Math.min(i, doc.plan.outputs.length - 1)].id);
}

// ---- files ------------------------------------------------------------------------------------

let host: Host | null = null;

export function useHost(h: Host): void {
  host = h;
}

export function getHost(): Host {
  if (!host) throw new Error('host adapter not set');
  return host;
}

function loadDocument(d: PlanDocument, opts: { dirty?: boolean } = {}): void {
  doc.load(d.plan, d.path, opts);
  view.select(d.plan.outputs[0].id, null);
  view.resetRange();
}

function confirmDiscard(): boolean {
  if (!doc.dirty && !pendingEdits.active) return true;
  return typeof window === 'undefined' || typeof window.confirm !== 'function' ? true : window.confirm('Discard the unsaved changes of this plan?');
}

export function newPlan(): void {
  if (!confirmDiscard()) return;
  loadDocument({ plan: edits.freshPlan(), path: null }, { dirty: false });
  view.notify('info', 'New plan: one full-range output at 48 kHz.');
}

export async function openPlan(): Promise<void> {
  if (!confirmDiscard()) return;
  const r = await getHost().openPlan();
  if (r.ok) {
    loadDocument(r.value);
    view.notify('info', `Opened ${doc.fileName ?? 'plan'}.${r.note ? ` ${r.note}` : ''}`, r.note ? 12000 : undefined);
  } else if (!('cancelled' in r)) view.notify('error', `Not opened, nothing changed. ${r.error}`, 15000);
}

export async function savePlan(as = false): Promise<boolean> {
  const h = getHost();
  // Text typed but not yet applied goes into the plan first; a save without it would say "saved".
  const refusal = pendingEdits.commit();
  if (refusal !== null) {
    view.notify('error', `Not saved: ${refusal}. Correct the entry, or press Escape in it to drop it, then save again.`, 15000);
    return false;
  }
  const plan = doc.plan;
  const r = as || !doc.path ? await h.savePlanAs(plan, doc.path) : await h.savePlan(plan, doc.path);
  if (r.ok) {
    doc.markSaved(r.value, plan); // edits made while the dialog was open stay unsaved
    await h.discardRecovery();
    const name = doc.fileName ?? r.value;
    // A download cannot be confirmed by the page: say what happened, not "saved".
    const said = r.downloaded
      ? `Downloaded ${name}. The browser does not confirm it was written: check your downloads folder before you close this tab.`
      : `Saved ${name}.`;
    view.notify('info', r.note ? `${said} ${r.note}` : said, r.downloaded || r.note ? 12000 : undefined);
    return true;
  }
  if (!('cancelled' in r)) view.notify('error', `Not saved: ${r.error}`, 15000);
  return false;
}

/** Re-reads the saved file. `ask: false` when the user already chose to (main's changed-on-disk question). */
export async function revertPlan(opts: { ask?: boolean } = {}): Promise<void> {
  const path = doc.path;
  if (!path) return view.notify('info', 'This plan has never been saved; nothing to revert to.');
  if (opts.ask !== false && doc.dirty && typeof window.confirm === 'function' && !window.confirm(`Discard the changes since ${doc.fileName} was saved?`)) return;
  const r = await getHost().revertPlan(path);
  if (r.ok) {
    loadDocument(r.value);
    view.notify('info', `Reverted to the saved ${doc.fileName}.`);
  } else if (!('cancelled' in r)) view.notify('error', `Not reverted: ${r.error}`, 15000);
}

export function undo(): void {
  if (!doc.undo()) view.notify('info', 'Nothing to undo.', 1500);
}

export function redo(): void {
  if (!doc.redo()) view.notify('info', 'Nothing to redo.', 1500);
}

// ---- plan sheet -------------------------------------------------------------------------------

/**
 * Prints the plan sheet (the browser's or Electron's print dialog, where "Save as PDF" writes the
 * PDF). The sheet is laid out first; the page's print stylesheet shows it alone.
 */
export async function printPlanSheet(): Promise<void> {
  view.printing = true;
  await tick();
  window.print();
}
