/**
 * The coil profile: a JSON description of a single-layer secondary, its top load and its primary,
 * in SI units with the unit in every name. The TypeBox schema is the single source of truth for
 * the type; `parseCoilProfile` validates one and explains what to fix.
 */
import { Type, type Static, type TSchema } from 'typebox';
import Value from 'typebox/value';
import { InputError } from '../errors.ts';

/** The secondary: a single-layer solenoid of round copper wire on a cylindrical former. */
export const SecondarySchema = Type.Object(
  {
    formDiameterM: Type.Number({ minimum: 0.005, maximum: 2, description: 'outside diameter of the coil former, where the wire lies, in m' }),
    windingLengthM: Type.Number({ minimum: 0.01, maximum: 5, description: 'axial length of the winding, in m' }),
    turns: Type.Integer({ minimum: 10, maximum: 20000, description: 'number of turns of the secondary (a whole number)' }),
    wireDiameterM: Type.Number({ minimum: 0.00005, maximum: 0.005, description: 'copper diameter of the secondary wire, in m' }),
  },
  { additionalProperties: false, description: 'single-layer secondary winding' },
);

export const TopLoadNoneSchema = Type.Object({ shape: Type.Literal('none') }, { additionalProperties: false });
export const TopLoadSphereSchema = Type.Object(
  {
    shape: Type.Literal('sphere'),
    diameterM: Type.Number({ minimum: 0.005, maximum: 3, description: 'sphere diameter, in m' }),
  },
  { additionalProperties: false },
);
export const TopLoadTorusSchema = Type.Object(
  {
    shape: Type.Literal('torus'),
    outerDiameterM: Type.Number({ minimum: 0.01, maximum: 5, description: 'overall outside diameter of the torus, in m' }),
    tubeDiameterM: Type.Number({ minimum: 0.002, maximum: 2, description: 'diameter of the torus tube (its cross-section), in m' }),
  },
  { additionalProperties: false },
);
/** Top load: none, an isolated sphere, or a torus (toroid). */
export const TopLoadSchema = Type.Union([TopLoadNoneSchema, TopLoadSphereSchema, TopLoadTorusSchema], {
  description: 'top load: { "shape": "none" | "sphere" | "torus", ... }',
});

/**
 * A primary that is itself a resonant tank (spark-gap coils, dual-resonant solid-state drivers):
 * the capacitor fitted (or none yet), how the tank is switched and, for a spark gap, the peak of the
 * supply that charges the capacitor.
 */
export const PrimaryTankSchema = Type.Object(
  {
    capacitanceF: Type.Union(
      [
        Type.Number({ minimum: 1e-12, maximum: 1e-3, description: 'capacitance fitted in the primary tank, in F (1 pF to 1 mF); null: none fitted yet' }),
        Type.Null(),
      ],
      { description: 'capacitance fitted in the primary tank, in F (1 pF to 1 mF); null: none fitted yet' },
    ),
    switching: Type.Union([Type.Literal('spark-gap'), Type.Literal('solid-state')], {
      description: 'how the tank is switched: "spark-gap" (a static or rotary gap fires it) or "solid-state" (a dual-resonant driver)',
    }),
    supplyPeakV: Type.Optional(
      Type.Union([
        Type.Number({
          minimum: 1,
          maximum: 1e6,
          description: 'spark gap: peak voltage of the supply that charges the tank capacitor, in V (1 V to 1 MV; √2 × the transformer’s RMS output)',
        }),
        Type.Null(),
      ]),
    ),
  },
  { additionalProperties: false, description: 'the primary as a resonant tank' },
);

/** The primary: a short helical winding coaxial with the secondary. */
export const PrimarySchema = Type.Object(
  {
    turns: Type.Integer({ minimum: 1, maximum: 100, description: 'number of primary turns (a whole number)' }),
    diameterM: Type.Number({ minimum: 0.01, maximum: 3, description: 'diameter of the primary turns through the wire centres, in m' }),
    windingLengthM: Type.Number({ minimum: 0.001, maximum: 1, description: 'axial length of the primary winding, in m' }),
    wireDiameterM: Type.Optional(
      Type.Number({
        minimum: 0.0001,
        maximum: 0.05,
        description: 'diameter of the primary conductor, in m (optional: with it the inductance is summed turn by turn, which corrects the current sheet for thin, widely spaced turns)',
      }),
    ),
    offsetM: Type.Number({
      minimum: -2,
      maximum: 5,
      description: 'axial position of the primary centre above the bottom of the secondary winding, in m (negative: below it)',
    }),
    leadInductanceH: Type.Optional(
      Type.Number({
        minimum: 0,
        maximum: 1e-4,
        description: 'inductance of the leads between the primary and its capacitor or driver, in H (0 to 100 µH; default 0; roughly 1 µH per metre of wire)',
      }),
    ),
    tank: Type.Optional(PrimaryTankSchema),
  },
  { additionalProperties: false, description: 'primary winding' },
);

/** Measured figures; each takes precedence over the computed one where given (null: not measured). */
export const MeasuredSchema = Type.Object(
  {
    resonanceHz: Type.Optional(
      Type.Union([Type.Number({ minimum: 1e3, maximum: 1e8, description: 'measured resonant frequency of the secondary with its top load, in Hz' }), Type.Null()]),
    ),
    qualityFactor: Type.Optional(
      Type.Union([Type.Number({ minimum: 1, maximum: 1e5, description: 'measured quality factor of the secondary (dimensionless)' }), Type.Null()]),
    ),
  },
  { additionalProperties: false, description: 'measured figures (null where not measured)' },
);

/** A coil profile as written in a file (optional fields may be absent). */
export const CoilProfileSchema = Type.Object(
  {
    name: Type.String({ minLength: 1, maxLength: 200, description: 'a name for the coil' }),
    secondary: SecondarySchema,
    topLoad: TopLoadSchema,
    extraCapacitanceF: Type.Optional(
      Type.Number({ minimum: 0, maximum: 1e-9, description: 'extra capacitance from the top of the secondary to ground, in F (default 0)' }),
    ),
    primary: PrimarySchema,
    measured: Type.Optional(MeasuredSchema),
  },
  { additionalProperties: false, description: 'coil profile' },
);

/** A coil profile as written in a file. */
export type CoilProfileInput = Static<typeof CoilProfileSchema>;
export type TopLoad = Static<typeof TopLoadSchema>;
/** A validated coil profile with every default filled in. */
export type CoilProfile = Omit<CoilProfileInput, 'extraCapacitanceF' | 'measured'> & {
  extraCapacitanceF: number;
  measured: { resonanceHz: number | null; qualityFactor: number | null };
};

const TOP_LOAD_BY_SHAPE: Record<string, TSchema> = { none: TopLoadNoneSchema, sphere: TopLoadSphereSchema, torus: TopLoadTorusSchema };

interface SchemaError {
  keyword: string;
  instancePath: string;
  params: Record<string, unknown>;
}

const show = (v: unknown): string => {
  if (v === undefined) return 'nothing';
  if (typeof v === 'number' && !Number.isFinite(v)) return String(v);
  const s = JSON.stringify(v);
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
};
const dotted = (pointer: string): string =>
  pointer.split('/').slice(1).map((p) => p.replace(/~1/g, '/').replace(/~0/g, '~')).join('.');
const join = (a: string, b: string): string => (a && b ? `${a}.${b}` : a || b);

function valueAt(root: unknown, field: string): unknown {
  let v: unknown = root;
  for (const p of field ? field.split('.') : []) v = v !== null && typeof v === 'object' ? (v as Record<string, unknown>)[p] : undefined;
  return v;
}

function schemaAt(root: TSchema, field: string): TSchema | undefined {
  let s: TSchema | undefined = root;
  for (const p of field ? field.split('.') : []) {
    const props: Record<string, TSchema> | undefined = (s as { properties?: Record<string, TSchema> } | undefined)?.properties;
    s = props?.[p];
    const alts: TSchema[] | undefined = (s as { anyOf?: TSchema[] } | undefined)?.anyOf;
    if (alts) s = alts.find((a: TSchema) => (a as { type?: string }).type === 'number' || 'properties' in a) ?? s;
  }
  return s;
}

const TYPE_WORDS: Record<string, string> = {
  number: 'a number', integer: 'a whole number', string: 'a string', object: 'a JSON object', null: 'null', boolean: 'true or false', array: 'a list',
};


/**
 * One message for the first problem, naming the dotted field (prefixed when `schema` is a
 * sub-schema at `prefix`); picks the most useful error among a nullable union's alternatives.
 */
function messageFor(schema: TSchema, value: unknown, errors: SchemaError[], prefix: string): { field: string; message: string } {
  const relevant = errors.filter((e) => e.keyword !== 'boolean' && e.keyword !== 'anyOf');
  const first = relevant[0] ?? errors[0];
  const rel = dotted(first.instancePath);
  // Prefer a range error at the same path over "must be null" from a nullable union.
  const same = relevant.filter((e) => e.instancePath === first.instancePath);
  const e = same.find((x) => x.keyword !== 'type') ?? first;
  const got = valueAt(value, rel);
  const field = join(prefix, rel);
  const where = field || 'the profile';
  const about = (r: string): string => {
    const d = (schemaAt(schema, r) as { description?: string } | undefined)?.description;
    return d ? ` (${join(prefix, r)}: ${d})` : '';
  };
  switch (e.keyword) {
    case 'required': {
      const missing = (e.params.requiredProperties as string[])[0];
      const f = join(field, missing);
      return { field: f, message: `${f} is missing${about(join(rel, missing))}; add it to the profile.` };
    }
    case 'additionalProperties': {
      const extra = (e.params.additionalProperties as string[])[0];
      const f = join(field, extra);
      const known = Object.keys((schemaAt(schema, rel) as { properties?: object } | undefined)?.properties ?? {});
      return { field: f, message: `${f} is not a known field; check its spelling (${where} takes ${known.join(', ')}).` };
    }
    case 'type': {
      const wanted = same.filter((x) => x.keyword === 'type').map((x) => TYPE_WORDS[String(x.params.type)] ?? String(x.params.type));
      return { field, message: `${where} must be ${wanted.join(' or ')}, got ${show(got)}${about(rel)}; fix it in the profile.` };
    }
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum': {
      const bound = e.keyword.includes('inimum') ? 'at least' : 'at most';
      const strict = e.keyword.startsWith('exclusive') ? ' (exclusive)' : '';
      return {
        field,
        message: `${where} must be ${bound} ${String(e.params.limit)}${strict}, got ${show(got)}${about(rel)}; check the value and its unit (SI: metres, farads, hertz).`,
      };
    }
    case 'minLength':
      return { field, message: `${where} must not be empty; give it a value.` };
    case 'maxLength':
      return { field, message: `${where} is longer than ${String(e.params.limit)} characters; shorten it.` };
    case 'const':
      return { field, message: `${where} must be ${show(e.params.allowedValue)}, got ${show(got)}; fix it in the profile.` };
    default:
      return { field, message: `${where} is not valid (${e.keyword}), got ${show(got)}; fix it in the profile.` };
  }
}

const fail = (field: string, message: string): never => {
  throw new InputError('bad-profile', `coil profile: ${message}`, field);
};

function check(schema: TSchema, value: unknown, prefix: string): void {
  if (Value.Check(schema, value)) return;
  const { field, message } = messageFor(schema, value, [...Value.Errors(schema, value)] as SchemaError[], prefix);
  fail(field, message);
}

/**
 * Validates a coil profile read from JSON and fills in defaults (extraCapacitanceF 0, measured
 * figures null). Throws InputError('bad-profile', message, field) for the first problem found,
 * naming the dotted field path, the rule, the value and what to do. Beyond the schema it checks:
 * the secondary fits in one layer (turns × wire diameter ≤ winding length: single-layer winding is
 * the practice of the trade and every model here assumes it); a torus has a hole (tube diameter <
 * outer diameter / 2); a primary that overlaps the secondary axially surrounds it (primary diameter
 * > former diameter + 2 × wire diameter).
 * Example: parseCoilProfile(JSON.parse(text)).secondary.turns.
 */
export function parseCoilProfile(json: unknown): CoilProfile {
  // The top load first, by its shape, so a union mismatch gives one clear message.
  if (json !== null && typeof json === 'object' && !Array.isArray(json)) {
    const top = (json as Record<string, unknown>).topLoad;
    if (top !== null && typeof top === 'object' && !Array.isArray(top)) {
      const shape = (top as Record<string, unknown>).shape;
      const variant = typeof shape === 'string' ? TOP_LOAD_BY_SHAPE[shape] : undefined;
      if (!variant) fail('topLoad.shape', `topLoad.shape must be "none", "sphere" or "torus", got ${show(shape)}; fix it in the profile.`);
      else check(variant, top, 'topLoad');
    }
  }
  check(CoilProfileSchema, json, '');
  const p = json as CoilProfileInput;
  const s = p.secondary;

  const layerM = s.turns * s.wireDiameterM;
  if (layerM > s.windingLengthM * (1 + 1e-9)) {
    fail(
      'secondary.turns',
      `secondary.turns × secondary.wireDiameterM = ${s.turns} × ${s.wireDiameterM} m = ${+layerM.toPrecision(6)} m exceeds secondary.windingLengthM = ${s.windingLengthM} m, so the turns do not fit in one layer; coilcue models single-layer secondaries only: use fewer turns, thinner wire or a longer winding.`,
    );
  }
  const pw = p.primary.wireDiameterM;
  if (pw !== undefined && p.primary.turns > 1 && p.primary.turns * pw > p.primary.windingLengthM * (1 + 1e-9)) {
    fail(
      'primary.wireDiameterM',
      `primary.turns × primary.wireDiameterM = ${p.primary.turns} × ${pw} m exceeds primary.windingLengthM = ${p.primary.windingLengthM} m, so the turns overlap; check the conductor diameter and the winding length (first turn's centre to last turn's centre plus one pitch).`,
    );
  }
  if (p.topLoad.shape === 'torus' && !(p.topLoad.tubeDiameterM < p.topLoad.outerDiameterM / 2)) {
    fail(
      'topLoad.tubeDiameterM',
      `topLoad.tubeDiameterM = ${p.topLoad.tubeDiameterM} m must be less than half of topLoad.outerDiameterM = ${p.topLoad.outerDiameterM} m, or the torus has no hole; check both diameters (outer diameter is across the whole torus).`,
    );
  }
  const pr = p.primary;
  const outerSecondaryM = s.formDiameterM + 2 * s.wireDiameterM;
  const overlaps = pr.offsetM + pr.windingLengthM / 2 > 0 && pr.offsetM - pr.windingLengthM / 2 < s.windingLengthM;
  if (overlaps && !(pr.diameterM > outerSecondaryM)) {
    fail(
      'primary.diameterM',
      `primary.diameterM = ${pr.diameterM} m must exceed the secondary's outside diameter ${+outerSecondaryM.toPrecision(6)} m (former + 2 × wire) where the primary surrounds the secondary; give the primary's diameter through its wire centres.`,
    );
  }
  return {
    name: p.name,
    secondary: { ...s },
    topLoad: { ...p.topLoad },
    extraCapacitanceF: p.extraCapacitanceF ?? 0,
    primary: { ...pr },
    measured: { resonanceHz: p.measured?.resonanceHz ?? null, qualityFactor: p.measured?.qualityFactor ?? null },
  };
}
