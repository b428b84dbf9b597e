/**
 * Dragging a target's breakpoints on the magnitude plot: each point of the selected chain's
 * `points` target is a handle (its id starts with a control character, which no band id may
 * hold); a drag moves it in frequency (between its neighbours) and level, one undoable step.
 */
import { AUDIO_BAND_TOP_FRACTION } from '$core/analysis/thresholds';
import { targetOf, withTarget, type FitScope } from '$core/fit/plan-fit';
import type { Target, TargetPart } from '$core/plan/types';
import * as edits from '$core/ui/edits';
import { documentState as doc } from '../state/document.svelte';

export const TARGET_HANDLE = '\u0001target:';

type Points = Extract<TargetPart, { kind: 'points' }>;

let start: { scope: FitScope; target: Target; part: number; point: number } | null = null;

/** The stored target's points part and its index, or null. */
export function pointsOf(target: Target | null): { part: Points; index: number } | null {
  if (!target) return null;
  const index = target.parts.findIndex((p) => p.kind === 'points');
  return index < 0 ? null : { part: target.parts[index] as Points, index };
}

export function isTargetHandle(id: string): boolean {
  return id.startsWith(TARGET_HANDLE);
}

export function beginTargetDrag(scope: FitScope, id: string): void {
  const target = targetOf(doc.plan, scope);
  const pts = pointsOf(target);
  if (!target || !pts) return;
  start = { scope, target, part: pts.index, point: Number(id.slice(TARGET_HANDLE.length)) };
  doc.beginGesture();
}

export function dragTarget(d: { freqRatio: number; deltaDb: number }): void {
  if (!start) return;
  const { scope, target, part, point } = start;
  const pts = (target.parts[part] as Points).points;
  const [f0, db0] = pts[point];
  // Kept strictly between its neighbours (the contract wants increasing frequencies).
  const lo = point > 0 ? pts[point - 1][0] * 1.001 : 1;
  const hi = point < pts.length - 1 ? pts[point + 1][0] / 1.001 : doc.plan.sampleRate * AUDIO_BAND_TOP_FRACTION;
  const f = Math.min(hi, Math.max(lo, f0 * d.freqRatio));
  const db = Math.max(-100, Math.min(100, Math.round((db0 + d.deltaDb) * 10) / 10));
  const moved: Points = { kind: 'points', points: pts.map((p, i): [number, number] => (i === point ? [+f.toPrecision(5), db] : [p[0], p[1]])) };
  const r = edits.validated(withTarget(doc.plan, scope, { ...target, parts: target.parts.map((p, i) => (i === part ? moved : p)) }));
  if (r.ok) doc.apply(r);
}

export function endTargetDrag(): void {
  start = null;
  doc.endGesture();
}
