import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { encodeWav, writeWavAtomic } from '../../server/audio/wav.ts';
import { synthLongDemo } from '../../shared/demo/clips.ts';
import { loadAndAnalyze } from '../../server/services/analysis.ts';
import { zeroCrossingEvents } from '../../shared/plan/pulse-train.ts';
import { evaluateStored } from '../../server/services/stored-plan.ts';
import { DEMO_DRIVERS } from '../../shared/demo/drivers.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
const dir = mkdtempSync(join(tmpdir(), 'p-'));
const wav = join(dir, 'a.wav');
const clip = synthLongDemo(300);
await writeWavAtomic(wav, encodeWav(clip, { format: 's16', seed: 1 }));
const { analysis, source } = await loadAndAnalyze(wav, {} as any);
const r = { analysis, pulseEvents: zeroCrossingEvents(source, analysis.sampleRate) };
const coil = Object.values(DEMO_COILS)[0];
for (const d of DEMO_DRIVERS.filter((x) => !process.env.ONLY || x.scheme === process.env.ONLY)) {
  let adv: any;
  const times: number[] = [];
  for (let i = 0; i < Number(process.env.N ?? 8); i++) {
    const t = performance.now();
    const out = evaluateStored(r as any, 'a', coil, d, {}, (i === 0 ? 0 : 3 - i * 0.5), 1000, adv);
    adv = out.advice;
    times.push(performance.now() - t);
  }
  console.log(d.scheme, d.name ?? '', times.map((x) => x.toFixed(0)).join(' '));
}
process.exit(0);
