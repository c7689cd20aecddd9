/**
 * analyzeFile and loadAndAnalyze (the analyze command and the server's analysis job): the file is
 * analysed as it is decoded, never held whole, and the analysis equals analyzeClip's on the decoded
 * samples, exactly, for every channel choice and sample format; the server's pulse candidates equal
 * zeroCrossingEvents of the modulation source.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { AnalysisWorker } from '../../../server/analysis/worker-handle.ts';
import { analyzeFileStream } from '../../../server/analysis/analyze-stream.ts';
import { decodeAudioFile } from '../../../server/audio/decode.ts';
import { encodeWav } from '../../../server/audio/wav.ts';
import { analyzeFile, loadAndAnalyze } from '../../../server/services/analysis.ts';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { modulationSource } from '../../../shared/audio/clip.ts';
import { InputError } from '../../../shared/errors.ts';
import { zeroCrossingEvents } from '../../../shared/plan/pulse-train.ts';
import { uniformNoise } from '../../shared/dsp/uniform-noise.ts';

describe('analyzeFile and loadAndAnalyze', () => {
  const dir = mkdtempSync(join(tmpdir(), 'coilcue-load-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const fs = 22050;
  // 30 s: the decoder hands the WAV over in many blocks (2^18 frames of 16-bit stereo, fewer of float)
  const n = 30 * fs + 17;
  const l = uniformNoise(n, 0.4, 3);
  const r = new Float32Array(n);
  for (let i = 0; i < n; i++) r[i] = 0.5 * Math.sin((2 * Math.PI * 440 * i) / fs) - 0.3 * l[i];
  const stereo = join(dir, 'stereo.wav');
  writeFileSync(stereo, encodeWav({ sampleRate: fs, channels: [l, r] }, { format: 'f32' }));
  const mono = join(dir, 'mono.wav');
  writeFileSync(mono, encodeWav({ sampleRate: fs, channels: [r] }, { format: 's16', seed: 1 }));

  for (const [file, channel] of [[stereo, 'mix'], [stereo, 'left'], [stereo, 'right'], [mono, 'mix']] as const) {
    it(`the ${channel} source of ${file === mono ? 'a mono' : 'a stereo'} file: analyzeClip's figures and the source's zero crossings`, async () => {
      const clip = await decodeAudioFile(file);
      const { analysis, pulseEvents } = await loadAndAnalyze(file, { channel });
      expect(analysis).toEqual(analyzeClip(clip, { channel }));
      expect(pulseEvents).toEqual(zeroCrossingEvents(modulationSource(clip, channel), fs));
      expect(await analyzeFile(file, { channel })).toEqual(analysis);
    });
  }

  it('on one thread (no worker) the figures are the same', async () => {
    const clip = await decodeAudioFile(stereo);
    const seen: string[] = [];
    const { analysis } = await analyzeFileStream(stereo, { worker: new AnalysisWorker(null), onSourcePart: (where) => seen.push(where) });
    expect(seen).toEqual(['main']);
    expect(analysis).toEqual(analyzeClip(clip));
  });

  it('a worker that stops part-way: the file is read again and analysed on this thread', async () => {
    const clip = await decodeAudioFile(stereo);
    const worker = new AnalysisWorker();
    expect(await worker.ready).toBe(true);
    let passes = 0;
    const { analysis } = await analyzeFileStream(stereo, {
      worker,
      sourceReducer: () => {
        passes++;
        let blocks = 0;
        // the worker dies after the second block of the first pass
        return () => void (passes === 1 && ++blocks === 2 && worker.terminate());
      },
    });
    expect(passes).toBe(2);
    expect(analysis).toEqual(analyzeClip(clip));
  });

  it('the right channel of a mono file is refused with a message that says what to choose', async () => {
    await expect(analyzeFile(mono, { channel: 'right' })).rejects.toThrow(InputError);
    await expect(analyzeFile(mono, { channel: 'right' })).rejects.toThrow(/choose the mix or the left channel/);
  });
});
