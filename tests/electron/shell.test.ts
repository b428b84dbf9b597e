/** Window titles (electron/title.ts) and plan paths from the command line (electron/launch-args.ts). */
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { planPathsFromArgv } from '../../electron/launch-args';
import { documentLabel, windowTitle } from '../../electron/title';

describe('windowTitle', () => {
  it('shows the plan name, the file and a marker while dirty', () => {
    expect(windowTitle({ name: 'Two-way monitor', path: '/p/monitor.bqplan', dirty: false })).toBe('Two-way monitor \u2014 monitor.bqplan \u2014 Biquadrant');
    expect(windowTitle({ name: 'Two-way monitor', path: '/p/monitor.bqplan', dirty: true })).toBe('\u2022 Two-way monitor \u2014 monitor.bqplan \u2014 Biquadrant');
    expect(windowTitle({ name: '  ', path: null, dirty: true })).toBe('\u2022 Untitled plan \u2014 not saved \u2014 Biquadrant');
  });

  it('documentLabel prefers the file name', () => {
    expect(documentLabel({ name: 'Hall', path: '/p/hall.bqplan' })).toBe('hall.bqplan');
    expect(documentLabel({ name: 'Hall', path: null })).toBe('Hall');
    expect(documentLabel({ name: '', path: null })).toBe('Untitled plan');
  });
});

describe('planPathsFromArgv', () => {
  it('keeps .bqplan arguments, resolved against the working directory, without switches or duplicates', () => {
    const argv = ['/opt/Biquadrant/biquadrant', '--no-sandbox', 'a.bqplan', '/abs/B.BQPLAN', 'notes.txt', '.', '--flag=x.bqplan', 'a.bqplan'];
    expect(planPathsFromArgv(argv, '/home/u')).toEqual([resolve('/home/u', 'a.bqplan'), resolve('/abs/B.BQPLAN')]);
  });

  it('ignores the executable itself and development arguments', () => {
    expect(planPathsFromArgv(['/x/electron.bqplan'], '/')).toEqual([]);
    expect(planPathsFromArgv(['electron', '.', 'out/main/index.js'], '/w')).toEqual([]);
  });
});
