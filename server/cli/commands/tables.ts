/**
 * The option table of every command (server/cli/options.ts): what each option is, its unit,
 * default and range. The help text, the usage line and the validation all come from here.
 *
 * Kept free of heavy imports: main.ts parses a command's options with these tables before it
 * starts the analysis worker or loads the command. Defaults that the planner also holds
 * (DEFAULT_MARGIN_K, DEFAULT_ALLOWED_SHARE in shared/plan/evaluate.ts, DEFAULT_MAX_COLUMNS in
 * shared/preview/modulation.ts) are checked against these in test/server/cli/options.test.ts.
 */
import { DEMO_COIL_NAMES } from '../../../shared/demo/coils.ts';
import { defineCommand } from '../options.ts';

const CHANNEL = { type: 'choice', what: 'which channel drives the coil', choices: ['mix', 'left', 'right'], default: 'mix' } as const;
const FORMAT = { type: 'choice', what: 'sample format of the WAV written (16-bit and 24-bit with dither, or 32-bit float)', choices: ['s16', 's24', 'f32'], default: 's16' } as const;
const JSON_OUT = { type: 'flag', what: 'print the result as JSON (figures in SI units, shares as fractions 0…1) instead of text' } as const;
const GAIN = {
  type: 'number',
  what: 'gain applied to the modulation source (0 dB: a full-scale sample swings the rail over its whole range, or takes a pulse to the longest on-time)',
  unit: 'dB',
  defaultText: 'the advised gain',
  min: -60,
  max: 40,
} as const;
const CLIP = { type: 'path', what: 'the music clip (WAV, FLAC, Ogg Vorbis or MP3)', value: 'audio', required: true, input: true } as const;
const COIL = { type: 'path', what: 'the coil profile (JSON)', value: 'coil.json', required: true, input: true } as const;
const DRIVER = { type: 'path', what: 'the driver profile (JSON)', value: 'driver.json', required: true, input: true } as const;
const MARGIN = { type: 'number', what: 'kept below each transistor’s maximum junction temperature', unit: 'K', default: 25, min: 0, max: 200 } as const;
const SHARE = {
  type: 'number',
  what: 'allowed share of over-modulated time and of pulses clamped by a limit (0.001 = 0.1 %)',
  unit: 'fraction 0…1',
  default: 0.001,
  min: 0,
  max: 0.5,
} as const;
const AMBIENT = { type: 'number', what: 'air temperature around the heat sinks', unit: '°C', defaultText: "the driver profile's", min: -40, max: 100 } as const;

export const ANALYZE_OPTIONS = defineCommand({
  name: 'analyze',
  positionals: { value: '<file>', what: 'the audio file to measure (WAV, FLAC, Ogg Vorbis or MP3)', min: 1, max: 1, input: true },
  options: {
    json: JSON_OUT,
    channel: { ...CHANNEL, what: 'which channel is the modulation source for the spectrum and pitch' },
    'frame-ms': { type: 'number', what: 'length of the analysis frames (envelopes, frame statistics)', unit: 'ms', default: 1, min: 0.1, max: 1000 },
  },
});

export const COIL_OPTIONS = defineCommand({
  name: 'coil',
  positionals: { value: '<coil.json>', what: 'the coil profile to model (or --demo)', min: 0, max: 1, input: true },
  options: {
    demo: { type: 'choice', what: 'model a built-in demo coil instead of a file', choices: DEMO_COIL_NAMES },
    json: JSON_OUT,
    'supply-v': { type: 'number', what: 'driver supply voltage, for the input power behind the arc-reach estimate', unit: 'V', min: 0, max: 10000 },
    'rail-current-a': { type: 'number', what: 'supply current at full rail, for the input power', unit: 'A', min: 0, max: 1000 },
    'on-time-ms': { type: 'number', what: 'longest pulse on-time (pulse drivers), for the energy behind the top-voltage bound', unit: 'ms', min: 0, max: 100 },
    'input-power-w': { type: 'number', what: 'mean input power, when known directly (overrides supply × current)', unit: 'W', min: 0, max: 1e6 },
    'wire-temp-c': { type: 'number', what: 'temperature of the secondary winding, for its resistance', unit: '°C', defaultText: '20', min: -50, max: 200 },
  },
  check(v, positionals) {
    if (v.demo !== undefined && positionals.length > 0) return 'give a profile file or --demo, not both';
    if (v.demo === undefined && positionals.length === 0) return 'give exactly one coil profile file (or --demo <name>)';
    return null;
  },
});

export const PLAN_OPTIONS = defineCommand({
  name: 'plan',
  options: {
    clip: { ...CLIP, required: false },
    coil: { ...COIL, required: false },
    driver: { ...DRIVER, required: false },
    set: { type: 'path', what: 'plan a whole set instead (its file names the coil, the driver and the clips)', value: 'set.json', input: true },
    'gain-db': GAIN,
    json: JSON_OUT,
    trace: { type: 'path', what: 'also write the per-frame traces (rail, losses, junction temperatures) as CSV', value: 'out.csv', ext: '.csv' },
    channel: CHANNEL,
    'margin-k': MARGIN,
    'allowed-share': SHARE,
    'ambient-c': AMBIENT,
    'pulse-source': {
      type: 'choice',
      what: 'where pulses come from on a pulse driver: each upward zero crossing, or locked to the tracked pitch',
      choices: ['zero-crossing', 'pitch-locked'],
      default: 'zero-crossing',
    },
    'common-gain': { type: 'flag', what: 'with --set: play every clip at the lowest of the advised gains (a clip with no safe gain is played at it too, and shows what it breaks)' },
  },
  notes: ['give --clip, --coil and --driver for one clip, or --set for a whole set'],
  check(v) {
    if (v.set !== undefined) {
      const extra = ['clip', 'coil', 'driver', 'gain-db', 'trace'].filter((k) => v[k] !== undefined).map((k) => `--${k}`);
      return extra.length ? `--set takes its coil, driver, clips and gains from the set file; drop ${extra.join(', ')}` : null;
    }
    const missing = ['clip', 'coil', 'driver'].filter((k) => v[k] === undefined).map((k) => `--${k}`);
    if (missing.length) return `missing ${missing.join(', ')} (or give --set for a whole set)`;
    return v['common-gain'] ? '--common-gain applies to a set: give it with --set' : null;
  },
});

const RENDER_LIKE = {
  clip: CLIP,
  coil: COIL,
  driver: DRIVER,
  out: { type: 'path', what: 'the WAV file to write (never the input clip)', value: 'file.wav', required: true, ext: '.wav' },
  'gain-db': GAIN,
  channel: CHANNEL,
  format: FORMAT,
} as const;

export const RENDER_OPTIONS = defineCommand({
  name: 'render',
  options: {
    ...RENDER_LIKE,
    'pre-emphasis-db': {
      type: 'number',
      what: 'high-shelf boost from the coil’s envelope corner: "auto" applies the plan’s advice, 0 turns it off',
      unit: 'dB',
      default: 'auto',
      min: -24,
      max: 24,
      word: 'auto',
    },
    'pre-emphasis-hz': { type: 'number', what: 'corner of the pre-emphasis shelf', unit: 'Hz', defaultText: "the coil's envelope corner f0/(2Q)", min: 1, max: 100000 },
    'ceiling-dbfs': { type: 'number', what: 'peak limiter ceiling on the render (0 dBFS = the rail at its ends, or the longest on-time)', unit: 'dBFS', default: 0, min: -40, max: 0 },
    'keep-unsafe': { type: 'flag', what: 'keep the file even when the re-plan of the render breaks a promised limit (exit code 3 all the same)' },
    json: JSON_OUT,
  },
  check: (v) =>
    v['pre-emphasis-hz'] !== undefined && v['pre-emphasis-db'] === 0 ? '--pre-emphasis-hz sets the corner of a shelf that --pre-emphasis-db 0 turns off: drop one of them' : null,
});

export const PREVIEW_OPTIONS = defineCommand({
  name: 'preview',
  options: {
    ...RENDER_LIKE,
    out: { ...RENDER_LIKE.out, what: 'the arc-sound WAV to write (never the input clip)' },
    columns: { type: 'number', what: 'columns of the display grid (each spans whole analysis frames)', unit: 'columns', default: 4000, min: 1, max: 100000, integer: true },
    trace: { type: 'path', what: 'also write the display grid as CSV (one row per column)', value: 'out.csv', ext: '.csv' },
    'chart-width': { type: 'number', what: 'width of the text chart', unit: 'characters', default: 72, min: 10, max: 400, integer: true },
    json: { ...JSON_OUT, what: 'print the result and the display grid as JSON instead of text' },
  },
});

export const DEMO_OPTIONS = defineCommand({
  name: 'demo',
  options: {
    out: { type: 'path', what: 'folder to write the demo scenario into', value: 'folder', defaultText: 'coilcue-demo' },
  },
});
