/**
 * Child process of the benchmark: analyses one file (untimed), then times the advice for it on the
 * demo coil with each demo driver: the gain search alone and the full report (budget, demand,
 * pre-emphasis). Prints JSON.
 */
import { analyzeClip } from '../../shared/analysis/analyze-clip.ts';
import { modulationSource } from '../../shared/audio/clip.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { DEMO_DRIVERS } from '../../shared/demo/drivers.ts';
import { DEMO_SMALL_RIG } from '../../shared/demo/small-rig.ts';
import { analyzeCoil } from '../../shared/physics/coil/analyze.ts';
import { adviseGain } from '../../shared/plan/advise.ts';
import { planSettings } from '../../shared/plan/evaluate.ts';
import { toPlanClip } from '../../shared/plan/plan-clip.ts';
import { planClipReport } from '../../shared/plan/report.ts';
import { decodeAudioFile } from '../../server/audio/decode.ts';

/** Run by test/bench/child.mjs (tsx's CommonJS hook, as bin/coilcue.cjs runs the product). */
export async function main(): Promise<void> {
  const clip = await decodeAudioFile(process.argv[2]);
  const analysis = analyzeClip(clip);
  const source = modulationSource(clip, 'mix');
  const desk = analyzeCoil(DEMO_COILS['desk-lantern']);
  // The small rig's driver runs on its own coil.
  const small = analyzeCoil(DEMO_SMALL_RIG.coil);
  const rows = DEMO_DRIVERS.map((driver) => {
    const coil = driver === DEMO_SMALL_RIG.driver ? small : desk;
    const pc = toPlanClip('bench', analysis, source, driver);
    const settings = planSettings(driver);
    let t = performance.now();
    const advice = adviseGain(pc, coil, driver, settings);
    const adviseMs = performance.now() - t;
    t = performance.now();
    planClipReport(pc, coil, driver, settings, { spectrum: analysis.spectrum.welch });
    const reportMs = performance.now() - t;
    return { driver: driver.name, scheme: driver.scheme, adviseMs, evaluations: advice.evaluations, perEvaluationMs: adviseMs / advice.evaluations, reportMs, advisedGainDb: advice.advisedGainDb, binding: advice.binding?.limit ?? null };
  });
  process.stdout.write(JSON.stringify(rows) + '\n');
}
