/**
 * Child process of the benchmark: decodes and analyses one file, then prints its own timings and
 * peak resident memory as JSON. Run alone so the memory figure is the analysis's, not the generator's.
 */
import { analyzeClip } from '../../shared/analysis/analyze-clip.ts';
import { decodeAudioFile } from '../../server/audio/decode.ts';

const file = process.argv[2];
const t0 = performance.now();
const clip = await decodeAudioFile(file);
const t1 = performance.now();
const stages: Record<string, number> = {};
let last = t1;
let lastStage = '';
analyzeClip(clip, {
  onProgress: (_f, stage) => {
    const now = performance.now();
    if (lastStage) stages[lastStage] = now - last;
    last = now;
    lastStage = stage;
  },
});
const t2 = performance.now();
process.stdout.write(
  JSON.stringify({
    decodeMs: t1 - t0,
    analyzeMs: t2 - t1,
    totalMs: t2 - t0,
    stagesMs: stages,
    durationS: clip.channels[0].length / clip.sampleRate,
    maxRssMiB: process.resourceUsage().maxRSS / 1024,
  }) + '\n',
);
