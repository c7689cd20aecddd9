/**
 * loadAndAnalyze (the server's analysis job): the analysis equals analyzeClip's on the decoded
 * samples, and the source it hands back is modulationSource's, bit for bit, for every channel
 * choice, although the channels were given up (the mix written over channel 0).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioFile } from '../../../server/audio/decode.ts';
import { encodeWav } from '../../../server/audio/wav.ts';
import { analyzeFile, loadAndAnalyze } from '../../../server/services/analysis.ts';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { modulationSource } from '../../../shared/audio/clip.ts';
import { uniformNoise } from '../../shared/dsp/uniform-noise.ts';

describe('loadAndAnalyze', () => {
  const dir = mkdtempSync(join(tmpdir(), 'coilcue-load-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const fs = 22050;
  const n = 3 * fs + 17;
  const l = uniformNoise(n, 0.4, 3);
  const r = new Float32Array(n);
  for (let i = 0; i < n; i++) r[i] = 0.5 * Math.sin((2 * Math.PI * 440 * i) / fs) - 0.3 * l[i];
  const stereo = join(dir, 'stereo.wav');
  writeFileSync(stereo, encodeWav({ sampleRate: fs, channels: [l, r] }, { format: 'f32' }));
  const mono = join(dir, 'mono.wav');
  writeFileSync(mono, encodeWav({ sampleRate: fs, channels: [r] }, { format: 's16', seed: 1 }));

  for (const [file, channel] of [[stereo, 'mix'], [stereo, 'left'], [stereo, 'right'], [mono, 'mix']] as const) {
    it(`hands back the ${channel} source of ${file === mono ? 'a mono' : 'a stereo'} file with the analysis`, async () => {
      const clip = await decodeAudioFile(file);
      const { analysis, source } = await loadAndAnalyze(file, { channel });
      expect(Array.from(source)).toEqual(Array.from(modulationSource(clip, channel)));
      expect(analysis).toEqual(analyzeClip(clip, { channel }));
      expect(analysis).toEqual(await analyzeFile(file, { channel }));
    });
  }
});
