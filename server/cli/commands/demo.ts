import { mkdir, writeFile } from 'node:fs/promises';
import { join, relative, resolve } from 'node:path';
import { DEMO_CLIPS, synthDemoClip } from '../../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';
import { DEMO_SMALL_RIG } from '../../../shared/demo/small-rig.ts';
import { InputError } from '../../../shared/errors.ts';
import { encodeWav } from '../../audio/wav.ts';
import { type Command, runWithArgs } from '../io.ts';
import { DEMO_OPTIONS } from './tables.ts';
import { analyzeCommand } from './analyze.ts';
import { coilCommand } from './coil.ts';
import { planCommand } from './plan.ts';

const DEMO_COIL = 'desk-lantern';
/** Invented bench measurements of the demo coil: resonance a little below the computed one, loaded Q. */
const DEMO_MEASURED = { resonanceHz: 318_000, qualityFactor: 45 };
const DEMO_DRIVERS = [DEMO_DRIVER_LINEAR, DEMO_DRIVER_BUCK, DEMO_DRIVER_PULSE];
const DRIVER_FILES = ['driver-linear.json', 'driver-buck.json', 'driver-pulse.json'];
/** The small rig: its own coil and single-bipolar driver. */
const SMALL_FILES = { coil: 'coil-small.json', driver: 'driver-small.json' };

/**
 * Writes our invented demo scenario (synthesised clips, a coil, three drivers, a set) into a folder
 * and runs the analysis, the coil model and the planner on it, section by section.
 */
export const demoCommand: Command<typeof DEMO_OPTIONS.options> = {
  options: DEMO_OPTIONS,
  async run({ values }, io) {
    const dir = resolve(io.cwd, values.out ?? 'coilcue-demo');
    try {
      await mkdir(dir, { recursive: true });
    } catch {
      throw new InputError('unwritable', `cannot create the folder ${dir}; choose another with --out`);
    }
    const shown = relative(io.cwd, dir) || '.';
    for (const c of DEMO_CLIPS) {
      await writeFile(join(dir, `${c.name}.wav`), encodeWav(synthDemoClip(c.name), { format: 's16', seed: 1 }));
    }
    // In the scenario the builder has measured the coil in place (ring-down with the top load mounted),
    // so the profile carries a measured resonance and a loaded Q: the figures take precedence over the
    // computed ones, and the coil report shows the discrepancy.
    const coil = { ...DEMO_COILS[DEMO_COIL], measured: DEMO_MEASURED };
    await writeFile(join(dir, 'coil.json'), JSON.stringify(coil, null, 2) + '\n');
    await Promise.all(DEMO_DRIVERS.map((d, i) => writeFile(join(dir, DRIVER_FILES[i]), JSON.stringify(d, null, 2) + '\n')));
    await writeFile(join(dir, SMALL_FILES.coil), JSON.stringify(DEMO_SMALL_RIG.coil, null, 2) + '\n');
    await writeFile(join(dir, SMALL_FILES.driver), JSON.stringify(DEMO_SMALL_RIG.driver, null, 2) + '\n');
    const set = {
      coil: 'coil.json',
      driver: DRIVER_FILES[0],
      items: DEMO_CLIPS.map((c, i) => ({ clip: `${c.name}.wav`, gapAfterS: i === DEMO_CLIPS.length - 1 ? 0 : 20, gainDb: null })),
    };
    await writeFile(join(dir, 'set.json'), JSON.stringify(set, null, 2) + '\n');

    const section = (title: string) => io.out(`\n== ${title}\n`);
    io.out(`demo scenario written to ${shown}/: ${DEMO_CLIPS.map((c) => `${c.name}.wav`).join(', ')}, coil.json, ${DRIVER_FILES.join(', ')}, set.json; the small rig: ${SMALL_FILES.coil}, ${SMALL_FILES.driver}\n`);
    const clip = join(dir, `${DEMO_CLIPS[0].name}.wav`);
    section(`analysis of ${DEMO_CLIPS[0].name}.wav`);
    await runWithArgs(analyzeCommand, [clip], io);
    section('coil model');
    const d0 = DEMO_DRIVERS[0];
    await runWithArgs(coilCommand, [join(dir, 'coil.json'), '--supply-v', String(d0.supplyVoltageV), '--rail-current-a', String(d0.fullRailCurrentA)], io);
    for (const f of DRIVER_FILES) {
      section(`plan for ${DEMO_CLIPS[0].name}.wav with ${f}`);
      await runWithArgs(planCommand, ['--clip', clip, '--coil', join(dir, 'coil.json'), '--driver', join(dir, f)], io);
    }
    section(`plan for ${DEMO_CLIPS[0].name}.wav on the small rig (${SMALL_FILES.coil}, ${SMALL_FILES.driver}: one bipolar switch, series MOSFET on the rail)`);
    await runWithArgs(planCommand, ['--clip', clip, '--coil', join(dir, SMALL_FILES.coil), '--driver', join(dir, SMALL_FILES.driver)], io);
    section(`set plan (${shown}/set.json)`);
    await runWithArgs(planCommand, ['--set', join(dir, 'set.json')], io);
    io.out(
      '\nCaution: a resonant coil makes high voltage and RF that can burn, injure or kill, and ozone, fire risk and radio ' +
        'interference; keep the keep-out distance, follow local codes and licensed practice, and protect your hearing.\n',
    );
    return 0;
  },
};
