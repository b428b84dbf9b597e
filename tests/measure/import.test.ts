/** importMeasurement: the importer is chosen by the file's header, not its name. */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { MeasurementFileError } from '../../src/measure/errors';
import { decodeText, importMeasurement, measurementKind } from '../../src/measure/import';

const WAV = new Uint8Array(readFileSync(fileURLToPath(new URL('../reference/fixtures/wav/ir-pcm16-44100.wav', import.meta.url))));

describe('importMeasurement', () => {
  it('a WAV file named .txt is still read as WAV; text is text', () => {
    expect(measurementKind(WAV)).toBe('wav');
    const m = importMeasurement('C:/meas/ir.txt', WAV);
    expect(m.name).toBe('ir');
    expect(m.phaseDeg).not.toBeNull();
    expect(m.delayMs).toBeGreaterThan(0);
    const t = importMeasurement('mid.frd', new TextEncoder().encode('\uFEFF100 1\n200 2\n'), { name: 'Mid' });
    expect(t.name).toBe('Mid');
    expect(t.magnitudeDb).toEqual([1, 2]);
  });

  it('refuses bytes that are neither WAV nor UTF-8 text', () => {
    expect(() => decodeText(new Uint8Array([0x31, 0x30, 0xff, 0xfe, 0x20]))).toThrow(MeasurementFileError);
    expect(decodeText(new TextEncoder().encode('\uFEFFa'))).toBe('a');
  });
});
