// How the command line words a set (formatSet in server/cli/commands/plan.ts) when a clip has no
// safe gain: the clip is marked silent with its reason, and the set is not called playable.
import { describe, expect, it } from 'vitest';
import { formatSet } from '../../../server/cli/commands/plan.ts';
import { planSettings } from '../../../shared/plan/evaluate.ts';
import { planSet } from '../../../shared/plan/set.ts';
import { COIL, linearDriver, mosfet, planClip, tone } from '../../shared/plan/fixtures.ts';

/** Rail-linear with strong sinks: only over-modulation binds (as in test/shared/plan/set-edges.test.ts). */
const STRONG = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 1 }, { rdsOnOhm: 1 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
);
const TONE = planClip('tone', tone(1000, 0.5, 1));
/** Peaks at 2000 (+66 dBFS): it over-modulates at any gain. */
const HOT = planClip('hot', tone(1000, 2000, 0.5, 8000, Math.PI / 2));

describe('formatSet', () => {
  const s = planSettings(STRONG);

  it('marks a clip with no safe gain silent, says why, and does not call the set playable', () => {
    const text = formatSet(planSet([{ clip: TONE, gapAfterS: 0, gainDb: null }, { clip: HOT, gapAfterS: 0, gainDb: null }], COIL, STRONG, s));
    expect(text).toMatch(/ 2\. hot: gain -inf dB \(advised none safe\), .*SILENT: no safe gain\n/);
    expect(text).toMatch(/\n {4}no gain keeps every limit even from a cold start: this clip cannot be played on this coil and driver/);
    expect(text).toMatch(/\nthe set does not play as planned: clip 2 has no safe gain and is planned silent; the others keep every limit\n$/);
    expect(text).not.toMatch(/every clip keeps every limit/);
  });

  it('says every clip keeps every limit only when every clip plays', () => {
    const text = formatSet(planSet([{ clip: TONE, gapAfterS: 0, gainDb: null }, { clip: TONE, gapAfterS: 0, gainDb: null }], COIL, STRONG, s));
    expect(text).toMatch(/\nevery clip keeps every limit\n$/);
    expect(text).not.toMatch(/SILENT/);
  });
});
