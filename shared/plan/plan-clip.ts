/**
 * From a clip analysis to the planner's input: the modulation source's frame statistics and
 * magnitude histogram, plus the pulse candidates when the driver uses the pulse scheme.
 */
import type { ClipAnalysis } from '../analysis/analyze-clip.ts';
import type { DriverProfile } from '../schemas/driver.ts';
import type { PlanClip } from './evaluate.ts';
import { pitchLockedEvents, zeroCrossingEvents } from './pulse-train.ts';

/** How pulse instants are taken from the music. */
export type PulseSource = 'zero-crossing' | 'pitch-locked';

/**
 * Builds the planner's view of a clip. `source` is the modulation signal the analysis describes
 * (modulationSource(clip, analysis.modulationChannel)); it is read once for zero crossings.
 */
export function toPlanClip(
  name: string,
  analysis: Pick<ClipAnalysis, 'durationS' | 'sampleRate' | 'frames' | 'histogram'> & { spectrum: Pick<ClipAnalysis['spectrum'], 'pitch'> },
  source: Float32Array,
  driver: Pick<DriverProfile, 'scheme'>,
  pulseSource: PulseSource = 'zero-crossing',
): PlanClip {
  const clip: PlanClip = { name, durationS: analysis.durationS, frames: analysis.frames, histogram: analysis.histogram };
  if (driver.scheme === 'pulse') {
    if (pulseSource === 'pitch-locked') {
      const f = analysis.frames;
      const peak = new Float32Array(f.count);
      for (let k = 0; k < f.count; k++) peak[k] = Math.max(Math.abs(f.min[k]), Math.abs(f.max[k]));
      const p = analysis.spectrum.pitch;
      const firstS = p.timesS.length ? p.timesS[0] - p.hopS / 2 : 0;
      clip.pulseEvents = pitchLockedEvents(p.f0Hz, p.hopS, peak, f.frameS, analysis.durationS, firstS);
    } else {
      clip.pulseEvents = zeroCrossingEvents(source, analysis.sampleRate);
    }
  }
  return clip;
}
