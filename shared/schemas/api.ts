/**
 * Schemas of the HTTP API (docs/api.md): bodies, queries, parameters and every response, as TypeBox
 * schemas beside the profile schemas they reuse. The server validates with them and generates its
 * OpenAPI description from them; the web client reads the types. Numbers carry their unit in the
 * name and their range here.
 */
import { Type, type Static, type TSchema } from 'typebox';
import { CoilProfileSchema } from './coil.ts';
import { DriverProfileSchema } from './driver.ts';

const Id = Type.String({ minLength: 1, maxLength: 64, pattern: '^[A-Za-z0-9_-]+$', description: 'identifier' });
const Time = Type.String({ description: 'ISO 8601 time' });
/** A JSON document built by the engine (its shape is the command line's --json output). */
const Document = (description: string) => Type.Object({}, { additionalProperties: true, description });

export const IdParams = Type.Object({ id: Id });

export const ProblemSchema = Type.Object(
  {
    type: Type.String(),
    title: Type.String(),
    status: Type.Integer({ minimum: 400, maximum: 599 }),
    detail: Type.String({ description: 'what is wrong and what to do' }),
    code: Type.String({ description: 'stable machine-readable reason' }),
    field: Type.Optional(Type.String({ description: 'dotted path of the offending input' })),
  },
  { description: 'RFC 9457 problem details' },
);
export type Problem = Static<typeof ProblemSchema>;

export const JobState = Type.Union([Type.Literal('queued'), Type.Literal('running'), Type.Literal('done'), Type.Literal('failed')]);
export const JobKind = Type.Union([Type.Literal('analysis'), Type.Literal('set-plan'), Type.Literal('render'), Type.Literal('preview')]);
export const JobSchema = Type.Object({
  id: Id,
  kind: JobKind,
  state: JobState,
  progress: Type.Number({ minimum: 0, maximum: 1, description: 'fraction of the work done' }),
  stage: Type.String(),
  error: Type.Union([Type.Null(), Type.Object({ code: Type.String(), detail: Type.String(), field: Type.Optional(Type.String()) })]),
  resultId: Type.Union([Type.String(), Type.Null()]),
  createdAt: Time,
  updatedAt: Time,
});
export type Job = Static<typeof JobSchema>;
export type JobStateName = Static<typeof JobState>;
export type JobKindName = Static<typeof JobKind>;

export const HealthSchema = Type.Object({
  ok: Type.Boolean(),
  database: Type.Union([Type.Literal('ok'), Type.Literal('unreachable')]),
  queueDepth: Type.Integer({ minimum: 0, description: 'jobs waiting' }),
  running: Type.Integer({ minimum: 0, description: 'jobs running' }),
});
export const VersionSchema = Type.Object({ name: Type.Literal('coilcue'), version: Type.String(), engineVersion: Type.String() });
export const CautionTopic = Type.Union([
  Type.Literal('mains'),
  Type.Literal('high-voltage'),
  Type.Literal('rf-burns'),
  Type.Literal('ozone'),
  Type.Literal('fire'),
  Type.Literal('radio'),
  Type.Literal('hearing'),
]);
export const CautionsSchema = Type.Object({ summary: Type.String(), items: Type.Array(Type.Object({ topic: CautionTopic, text: Type.String() })) });

export const AudioFormat = Type.Union([Type.Literal('wav'), Type.Literal('flac'), Type.Literal('ogg'), Type.Literal('mp3')]);
export const ClipSchema = Type.Object({
  id: Id,
  name: Type.String(),
  sha256: Type.String({ pattern: '^[0-9a-f]{64}$' }),
  sizeBytes: Type.Integer({ minimum: 1 }),
  format: AudioFormat,
  sampleRate: Type.Integer({ minimum: 1, description: 'Hz' }),
  channels: Type.Integer({ minimum: 1 }),
  durationS: Type.Number({ minimum: 0, description: 's' }),
  createdAt: Time,
});
export type Clip = Static<typeof ClipSchema>;
export const ClipListSchema = Type.Object({ items: Type.Array(ClipSchema) });

export const Channel = Type.Union([Type.Literal('mix'), Type.Literal('left'), Type.Literal('right')]);
export const AnalysisSettingsSchema = Type.Object(
  { channel: Channel, frameMs: Type.Number({ minimum: 0.5, maximum: 20, description: 'frame length of the statistics, ms' }) },
  { additionalProperties: false },
);
export type AnalysisSettings = Static<typeof AnalysisSettingsSchema>;
export const AnalysisRequestSchema = Type.Partial(AnalysisSettingsSchema, { additionalProperties: false });
export const AnalysisSchema = Type.Object({
  id: Id,
  clipId: Id,
  settings: AnalysisSettingsSchema,
  engineVersion: Type.String(),
  state: JobState,
  jobId: Type.Union([Id, Type.Null()]),
  summary: Type.Union([Document('`coilcue analyze --json`'), Type.Null()]),
  createdAt: Time,
});
export type Analysis = Static<typeof AnalysisSchema>;
export const AnalysisListSchema = Type.Object({ items: Type.Array(AnalysisSchema) });
export const AnalysisStartedSchema = Type.Object({ analysis: AnalysisSchema, job: JobSchema });

export const DisplayQuerySchema = Type.Object(
  {
    columns: Type.Optional(Type.Integer({ minimum: 1, maximum: 8000, description: 'most display columns (default 1000)' })),
    fromS: Type.Optional(Type.Number({ minimum: 0, description: 's' })),
    toS: Type.Optional(Type.Number({ minimum: 0, description: 's' })),
  },
  { additionalProperties: false },
);
const Nums = Type.Array(Type.Number());
const NullableNums = Type.Array(Type.Union([Type.Number(), Type.Null()]));
export const DisplaySchema = Type.Object({
  fromS: Type.Number(),
  toS: Type.Number(),
  timeS: Nums,
  peakMin: Nums,
  peakMax: Nums,
  rmsDbfs: NullableNums,
  spectrum: Type.Object({ freqHz: Nums, powerDb: Nums }),
  spectrogram: Type.Object({ timeS: Nums, freqHz: Nums, powerDb: Type.Array(Nums) }),
});
export type Display = Static<typeof DisplaySchema>;

export const CoilBodySchema = CoilProfileSchema;
export const DriverBodySchema = DriverProfileSchema;
export const CoilSchema = Type.Object({
  id: Id,
  name: Type.String(),
  profile: CoilProfileSchema,
  report: Document('`coilcue coil --json`'),
  createdAt: Time,
  updatedAt: Time,
});
export const DriverSchema = Type.Object({ id: Id, name: Type.String(), profile: DriverProfileSchema, createdAt: Time, updatedAt: Time });
export const CoilListSchema = Type.Object({ items: Type.Array(CoilSchema) });
export const DriverListSchema = Type.Object({ items: Type.Array(DriverSchema) });

const Gain = Type.Number({ minimum: -60, maximum: 40, description: 'gain before the coil, dB' });
export const PlanSettingsSchema = Type.Object(
  {
    marginK: Type.Optional(Type.Number({ minimum: 0, maximum: 200, description: 'kelvin kept below each Tj max' })),
    allowedShare: Type.Optional(Type.Number({ minimum: 0, maximum: 0.5, description: 'allowed share of over-modulated time and clamped pulses' })),
    ambientC: Type.Optional(Type.Number({ minimum: -40, maximum: 100, description: 'ambient temperature, °C' })),
  },
  { additionalProperties: false },
);
export const PlanRequestSchema = Type.Object(
  {
    clipId: Id,
    coilId: Id,
    driverId: Id,
    gainDb: Type.Optional(Type.Union([Gain, Type.Null()])),
    channel: Type.Optional(Channel),
    settings: Type.Optional(PlanSettingsSchema),
  },
  { additionalProperties: false },
);
export type PlanRequest = Static<typeof PlanRequestSchema>;
export const PlanSchema = Type.Object({
  id: Id,
  clipId: Id,
  coilId: Id,
  driverId: Id,
  analysisId: Id,
  coil: CoilProfileSchema,
  driver: DriverProfileSchema,
  gainDb: Type.Union([Type.Number(), Type.Null()]),
  document: Document('`coilcue plan --json`'),
  createdAt: Time,
});
export type Plan = Static<typeof PlanSchema>;
export const JobOnlySchema = Type.Object({ job: JobSchema });
export const EvaluateRequestSchema = Type.Object(
  { gainDb: Gain, columns: Type.Optional(Type.Integer({ minimum: 1, maximum: 8000, description: 'most columns of the temperature traces (default 1000)' })) },
  { additionalProperties: false },
);
const DeviceTrace = Type.Object({ role: Type.String(), junctionC: Nums, limitC: Type.Number(), tjMaxC: Type.Number() });
export const EvaluateSchema = Type.Object({
  document: Document('`coilcue plan --json` at the asked gain'),
  temperatures: Type.Object({ timeS: Nums, devices: Type.Array(DeviceTrace) }),
});
export const ModulationQuerySchema = Type.Object(
  {
    columns: Type.Optional(Type.Integer({ minimum: 1, maximum: 8000 })),
    fromS: Type.Optional(Type.Number({ minimum: 0 })),
    toS: Type.Optional(Type.Number({ minimum: 0 })),
    gainDb: Type.Optional(Gain),
  },
  { additionalProperties: false },
);
const NumsOrNull = Type.Union([Nums, Type.Null()]);
export const ModulationSchema = Type.Object({
  scheme: Type.String(),
  gainDb: Type.Number(),
  supplyVoltageV: Type.Number(),
  fromS: Type.Number(),
  toS: Type.Number(),
  timeS: Nums,
  railMinV: NumsOrNull,
  railMaxV: NumsOrNull,
  pulseCount: NumsOrNull,
  maxOnTimeS: NumsOrNull,
  powerMeanW: Nums,
  powerMaxW: Nums,
});
export type Modulation = Static<typeof ModulationSchema>;

export const SetItemSchema = Type.Object(
  {
    clipId: Id,
    gapAfterS: Type.Number({ minimum: 0, maximum: 86400, description: 'idle time after the clip, s' }),
    gainDb: Type.Union([Gain, Type.Null()]),
  },
  { additionalProperties: false },
);
export const SetRequestSchema = Type.Object(
  {
    name: Type.String({ minLength: 1, maxLength: 200 }),
    coilId: Id,
    driverId: Id,
    items: Type.Array(SetItemSchema, { minItems: 1, maxItems: 500 }),
    commonGain: Type.Optional(Type.Boolean({ description: 'play every clip at the lowest advised gain among the clips that have one (a clip with none is played at it too, and shows what it breaks)' })),
  },
  { additionalProperties: false },
);
export type SetRequest = Static<typeof SetRequestSchema>;
export const ShowSetSchema = Type.Object({
  id: Id,
  name: Type.String(),
  coilId: Id,
  driverId: Id,
  items: Type.Array(SetItemSchema),
  commonGain: Type.Boolean(),
  createdAt: Time,
  updatedAt: Time,
});
export type ShowSet = Static<typeof ShowSetSchema>;
export const SetListSchema = Type.Object({ items: Type.Array(ShowSetSchema) });
export const SetPlanSchema = Type.Object({
  result: Document('`coilcue plan --set --json`'),
  temperatures: Type.Object({
    timeS: Nums,
    devices: Type.Array(Type.Object({ role: Type.String(), junctionC: Nums, limitC: Type.Number() })),
    gaps: Type.Array(Type.Object({ fromS: Type.Number(), toS: Type.Number() })),
  }),
});

export const RenderRequestSchema = Type.Object(
  {
    kind: Type.Union([Type.Literal('render'), Type.Literal('preview')]),
    gainDb: Type.Optional(Type.Union([Gain, Type.Null()])),
    format: Type.Optional(Type.Union([Type.Literal('s16'), Type.Literal('s24'), Type.Literal('f32')])),
    preEmphasisDb: Type.Optional(Type.Number({ minimum: -24, maximum: 24, description: 'high-shelf gain above the modulation corner, dB (0: none)' })),
    ceilingDbfs: Type.Optional(Type.Number({ minimum: -40, maximum: 0, description: 'limiter ceiling, dBFS (default 0)' })),
  },
  { additionalProperties: false },
);
export type RenderRequest = Static<typeof RenderRequestSchema>;
export const RenderSchema = Type.Object({
  id: Id,
  planId: Id,
  kind: Type.Union([Type.Literal('render'), Type.Literal('preview')]),
  state: JobState,
  jobId: Type.Union([Id, Type.Null()]),
  safe: Type.Union([Type.Boolean(), Type.Null()]),
  summary: Type.Union([Document('`coilcue render --json` or `preview --json`'), Type.Null()]),
  createdAt: Time,
});
export type Render = Static<typeof RenderSchema>;
export const RenderStartedSchema = Type.Object({ render: RenderSchema, job: JobSchema });

/** The problem answers a route may give, one schema per status. */
export const problems = (...statuses: number[]): Record<number, TSchema> => Object.fromEntries(statuses.map((s) => [s, ProblemSchema]));
