/**
 * A seeded mutation fuzzer's building blocks: a small deterministic PRNG (mulberry32, a public
 * domain 32-bit generator; common practice, no source) and mutations of JSON values and text that
 * hostile or broken files contain: extreme numbers, bare NaN/Infinity, wrong types, missing and
 * unknown fields, control characters, over-long names, repeated list items, deep nesting, a byte
 * order mark, truncation and flipped characters.
 */

export type Rng = () => number;

export function mulberry32(seed: number): Rng {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export const pick = <T>(rng: Rng, list: readonly T[]): T => list[Math.floor(rng() * list.length)];

/** Numbers at and past every limit the plan contract states, and the doubles' own extremes. */
export const EXTREME_NUMBERS = [
  0, -0, 1, -1, 5e-324, -5e-324, 1e-300, 1e-9, 0.001, 0.01, 0.5, 2, 16.2, 17.4, 60, 61, 64, 65, 136, 137, 1000, 1001, 2000, 1e6, 1e155,
  1e308, -1e308, 7999, 8000, 384000, 384001, 23999.99, 24000, 1e-6, 4294967296, 2147483647, -2147483648,
];

const CONTROL = ['\n', '\r', '\u0000', '\u0007', '\u001b', '\u007f', '\u0085', '\u2028', '\t'];

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

interface Slot {
  get(): Json;
  set(v: Json): void;
  remove(): void;
  parent: Json[] | { [k: string]: Json };
}

/** Every place in a JSON tree that holds a value (explicit stack: the tree may be deep). */
function slots(root: { value: Json }): Slot[] {
  const out: Slot[] = [];
  const stack: Json[] = [root.value];
  while (stack.length > 0) {
    const v = stack.pop()!;
    if (Array.isArray(v)) {
      v.forEach((x, i) => {
        out.push({ get: () => v[i], set: (n) => (v[i] = n), remove: () => v.splice(i, 1), parent: v });
        stack.push(x);
      });
    } else if (v !== null && typeof v === 'object') {
      for (const k of Object.keys(v)) {
        out.push({ get: () => v[k], set: (n) => (v[k] = n), remove: () => delete v[k], parent: v });
        stack.push(v[k]);
      }
    }
  }
  return out;
}

/** One mutation of a parsed JSON value, in place (the root is wrapped so it can be replaced). */
export function mutateValue(rng: Rng, root: { value: Json }): void {
  const all = slots(root);
  if (all.length === 0) return;
  const s = pick(rng, all);
  const v = s.get();
  const r = rng();
  if (typeof v === 'number') {
    if (r < 0.5) s.set(pick(rng, EXTREME_NUMBERS));
    else if (r < 0.8) s.set(v * Math.pow(10, (rng() - 0.5) * 6));
    else s.set(pick(rng, [String(v), null, true, [v], { v }]));
    return;
  }
  if (typeof v === 'string') {
    if (r < 0.35) s.set(v.slice(0, 3) + pick(rng, CONTROL) + ' gain 0x07FFFFFF' + v.slice(3));
    else if (r < 0.5) s.set('n'.repeat(pick(rng, [0, 32, 33, 200, 201])));
    else if (r < 0.65) s.set(v.toUpperCase());
    else if (r < 0.8) s.set(pick(rng, ['raw', 'peaking', 'lowShelf', 'highShelf', 'bessel', 'linkwitz-riley', 'fixed', 'hex', 'negated', 'first-section', 'ms']));
    else s.set(pick(rng, [0, null, [], {}]));
    return;
  }
  if (Array.isArray(v)) {
    if (r < 0.35 && v.length > 0) {
      const item = v[Math.floor(rng() * v.length)];
      const copies = pick(rng, [1, 2, 16, 64, 70, 140]);
      for (let k = 0; k < copies; k++) v.push(JSON.parse(JSON.stringify(item)) as Json);
    } else if (r < 0.55) v.length = 0;
    else if (r < 0.75 && v.length > 0) v.splice(Math.floor(rng() * v.length), 1);
    else s.set(pick(rng, [null, {}, 'list', 3]));
    return;
  }
  if (v !== null && typeof v === 'object') {
    const keys = Object.keys(v);
    if (r < 0.4 && keys.length > 0) delete v[pick(rng, keys)];
    else if (r < 0.55) v[pick(rng, ['extra', 'q', 'slope', 'gainDb', 'coefficients', 'a0', 'normalization', 'profile'])] = pick(rng, EXTREME_NUMBERS);
    else if (r < 0.7) s.set(pick(rng, [null, [], 'object', 1]));
    else if (keys.length > 0) s.remove();
    return;
  }
  s.set(pick(rng, EXTREME_NUMBERS));
}

/** A change a valid plan usually survives: a number scaled by 0.5 .. 2, a boolean flipped. */
export function mutateMildly(rng: Rng, root: { value: Json }): void {
  const all = slots(root).filter((s) => typeof s.get() === 'number' || typeof s.get() === 'boolean');
  if (all.length === 0) return;
  const s = pick(rng, all);
  const v = s.get();
  s.set(typeof v === 'boolean' ? !v : (v as number) * Math.pow(2, (rng() - 0.5) * 2));
}

/** One text-level mutation: bare non-finite numbers, truncation, a BOM, deep nesting, a flipped character. */
export function mutateText(rng: Rng, text: string): string {
  const r = rng();
  if (r < 0.25) {
    const numbers = [...text.matchAll(/-?\d+(\.\d+)?(e[+-]?\d+)?/gi)];
    if (numbers.length === 0) return text;
    const m = pick(rng, numbers);
    return text.slice(0, m.index) + pick(rng, ['NaN', 'Infinity', '-Infinity', '1e400', '-1e400', '0x10', '1.', '.5', '+1']) + text.slice(m.index! + m[0].length);
  }
  if (r < 0.4) return text.slice(0, Math.floor(rng() * text.length));
  if (r < 0.5) return '\uFEFF' + text;
  if (r < 0.6) {
    const depth = pick(rng, [10, 1000, 5000]);
    const inner = pick(rng, ['NaN', '1', '"x"', '{}']);
    return text.replace(/"bands":\s*\[/, `"bands": [${'['.repeat(depth)}${inner}${']'.repeat(depth)},`);
  }
  if (r < 0.75) {
    const i = Math.floor(rng() * text.length);
    return text.slice(0, i) + pick(rng, ['"', '{', '}', ',', ':', '\\', '\n', '\u0000', 'x', ']']) + text.slice(i + 1);
  }
  const lines = text.split('\n');
  const i = Math.floor(rng() * lines.length);
  if (r < 0.85) lines.splice(i, 1);
  else lines.splice(i, 0, pick(rng, ['gain 2000', 'delay -5', 'output A', 'output a', '1 2 3', '1e400 0 0 0 0', '# Sample rate: 1 Hz', 'delay soon ms', ',,,,', '']));
  return lines.join('\n');
}
