import { readFileSync } from 'node:fs';
import { encodeWav } from '../../server/audio/wav.ts';
import { synthLongDemo } from '../../shared/demo/clips.ts';
import { appOn, tempDataDir, multipart, waitJob } from '../server/app/helpers.ts';
import { DEMO_DRIVERS } from '../../shared/demo/drivers.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
const bytes = encodeWav(synthLongDemo(300), { format: 's16', seed: 1 });
const { dir } = tempDataDir();
const app = await appOn(dir);
const up = await app.inject({ method: 'POST', url: '/api/clips', ...multipart([{ name: 'a.wav', bytes }]) });
const clip = up.json().clip ?? up.json();
const st = (await app.inject({ method: 'POST', url: `/api/clips/${clip.id}/analyses`, payload: {} })).json();
await waitJob(app, st.job.id, 120000);
const coil = (await app.inject({ method: 'POST', url: '/api/coils', payload: Object.values(DEMO_COILS)[0] })).json();
for (const d of DEMO_DRIVERS.filter((x) => !process.env.ONLY || x.scheme === process.env.ONLY)) {
  const drv = (await app.inject({ method: 'POST', url: '/api/drivers', payload: d })).json();
  const plan = (await app.inject({ method: 'POST', url: '/api/plans', payload: { clipId: clip.id, coilId: coil.id, driverId: drv.id } })).json();
  const g = (plan.document.advisedGainDb ?? -20) + 3;
  const times: number[] = [];
  for (let i = 0; i < Number(process.env.N ?? 8); i++) {
    const t = performance.now();
    const r = await app.inject({ method: 'POST', url: `/api/plans/${plan.id}/evaluate`, payload: { gainDb: g - (i % 5) * 0.5, columns: 1000 } });
    times.push(performance.now() - t);
    if (r.statusCode !== 200) throw new Error(r.body);
    if (i === 0) console.log('bytes', r.body.length);
  }
  console.log(d.scheme, times.map((x) => x.toFixed(0)).join(' '));
}
await app.close();
process.exit(0);
