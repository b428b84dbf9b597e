/**
 * Words for messages that come from the core: the plan reader names a field by its path in the
 * file ("outputs[0].bands[11].coefficients.a0: must not be 0") and the analysis names outputs
 * and bands by their ids ("output woofer ...", "band b3 ..."). Beside a field, or in the status
 * bar, the user knows them by the field's name, the output's name and the band's number.
 */
import type { Warning } from '../../../src/analysis/check';
import type { Plan } from '../../../src/plan/types';

const PATH_PREFIX = /^((?:[A-Za-z_][A-Za-z0-9_]*|\[\d+\])(?:\.[A-Za-z_][A-Za-z0-9_]*|\[\d+\])*): /;

/** A reader refusal shown beside a field: the field's own name instead of its path in the file. */
export function fieldReason(reason: string): string {
  const m = PATH_PREFIX.exec(reason);
  if (!m) return reason;
  const last = m[1].replace(/\[\d+\]$/, '').split('.').pop() ?? m[1];
  return `${last}: ${reason.slice(m[0].length)}`;
}

function escapeRegExp(s: string): string {
  return s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

/** An analysis warning with the output's name and the band's number in its chain. */
export function warningText(plan: Plan, w: Warning): string {
  const [chainId, bandId] = w.where.split('/');
  const output = plan.outputs.find((o) => o.id === chainId);
  let text = w.message;
  if (output) text = text.replace(new RegExp(`^output ${escapeRegExp(output.id)}(?=[ :])`), output.name);
  if (bandId !== undefined) {
    const bands = chainId === 'input' ? plan.input.bands : (output?.bands ?? []);
    const i = bands.findIndex((b) => b.id === bandId);
    const chainName = chainId === 'input' ? 'Input chain' : (output?.name ?? chainId);
    if (i >= 0) text = text.replace(new RegExp(`^band ${escapeRegExp(bandId)}(?= )`), `${chainName}, band ${i + 1}`);
  }
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** Where a designed section came from ("sub/highPass", "input/b1") as the user knows it. */
export function sectionSource(plan: Plan, from: string): string {
  const [chainId, part] = from.split('/');
  if (part === undefined) return from;
  if (chainId === 'input') {
    const i = plan.input.bands.findIndex((b) => b.id === part);
    return i >= 0 ? `input band ${i + 1}` : from;
  }
  const output = plan.outputs.find((o) => o.id === chainId);
  if (!output) return from;
  if (part === 'highPass') return 'high-pass edge';
  if (part === 'lowPass') return 'low-pass edge';
  const i = output.bands.findIndex((b) => b.id === part);
  return i >= 0 ? `band ${i + 1}` : from;
}

/**
 * "input chain band b3", "Tweeter band b1" (the rate refusal of src/ui/edits) with the band's
 * number in its chain, as the band list and the plot handles show it.
 */
export function bandNumbers(plan: Plan, text: string): string {
  const chains: { name: string; bands: Plan['input']['bands'] }[] = [{ name: 'input chain', bands: plan.input.bands }, ...plan.outputs.map((o) => ({ name: o.name, bands: o.bands }))];
  let out = text;
  for (const c of chains) {
    out = out.replace(new RegExp(`(^|, |below )${escapeRegExp(c.name)} band ([a-z0-9_-]+) at`, 'g'), (all, lead: string, id: string) => {
      const i = c.bands.findIndex((b) => b.id === id);
      return i >= 0 ? `${lead}${c.name} band ${i + 1} at` : all;
    });
  }
  return out;
}
