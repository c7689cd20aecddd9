import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { encodeWav, writeWavAtomic } from '../../server/audio/wav.ts';
import { synthLongDemo } from '../../shared/demo/clips.ts';
import { loadAndAnalyze } from '../../server/services/analysis.ts';
import { zeroCrossingEvents, pulsesAtGain, pulseLimitsFor } from '../../shared/plan/pulse-train.ts';
import { simulatePulses } from '../../shared/physics/driver/simulate-pulses.ts';
import { DEMO_DRIVER_PULSE } from '../../shared/demo/drivers.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { coilReportFor, coilAtResonance } from '../../server/services/profiles.ts';
import { dbToAmp } from '../../shared/units.ts';
const dir = mkdtempSync(join(tmpdir(), 'p-'));
const wav = join(dir, 'a.wav');
await writeWavAtomic(wav, encodeWav(synthLongDemo(300), { format: 's16', seed: 1 }));
const { analysis, source } = await loadAndAnalyze(wav, {} as any);
const ev = zeroCrossingEvents(source, analysis.sampleRate);
const d = DEMO_DRIVER_PULSE;
const coil = coilAtResonance(coilReportFor(Object.values(DEMO_COILS)[0], d));
const train = pulsesAtGain(ev, dbToAmp(3), pulseLimitsFor(d.pulse!, coil.resonanceHz));
console.log('pulses', train.count, 'events', ev.timeS.length);
const p = { startS: train.startS.subarray(0, train.count), onS: train.onS.subarray(0, train.count) };
for (const traces of [false, true, false, true, false, true]) {
  const t = performance.now();
  const s = simulatePulses(d, coil, p, analysis.durationS, { traces, frameS: 1e-3 });
  console.log(traces, (performance.now() - t).toFixed(1), 'ms', s.devices[0].peakJunctionC);
}
process.exit(0);
