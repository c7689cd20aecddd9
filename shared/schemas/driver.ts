/**
 * Driver profile: the switching electronics of a coil, as other tools write it (JSON). TypeBox
 * schema (the single source of truth for the type) plus the cross-field rules JSON Schema cannot
 * say well, in {@link parseDriverProfile}.
 *
 * Device entries are PER SWITCH: one entry per role describes each of the identical switches of
 * that role (a half-bridge has 2 bridge switches, a full bridge 4, a single-switch driver 1; the
 * pass and modulator roles have one device each), and every loss and temperature computed from
 * it is per switch. Each switch has its own heat sink as its `thermal` block describes (a shared
 * sink is not modelled).
 */
import Type, { type Static } from 'typebox';
import Value from 'typebox/value';
import { InputError } from '../errors.ts';

const num = (description: string, range: { minimum?: number; maximum?: number; exclusiveMinimum?: number }) =>
  Type.Number({ description, ...range });

/** One parallel RC cell of the datasheet's junction–case Foster model. */
export const FosterStageSchema = Type.Object(
  {
    rKPerW: num('Foster cell resistance Rᵢ in K/W (0 < R ≤ 100)', { exclusiveMinimum: 0, maximum: 100 }),
    tauS: num('Foster cell time constant τᵢ = RᵢCᵢ in s (0 < τ ≤ 10000)', { exclusiveMinimum: 0, maximum: 1e4 }),
  },
  { additionalProperties: false },
);

/** Thermal path of one switch, junction to ambient. */
export const DeviceThermalSchema = Type.Object(
  {
    foster: Type.Array(FosterStageSchema, {
      maxItems: 10,
      description: 'Junction–case transient thermal impedance as a Foster set (datasheet Zth(j-c)), 1 to 10 cells',
    }),
    caseToSinkKPerW: num('Case–sink interface resistance in K/W (0 ≤ R ≤ 100; pad or grease)', { minimum: 0, maximum: 100 }),
    sinkToAmbientKPerW: num(
      'Sink–ambient resistance in K/W for this switch’s own sink (0 ≤ R ≤ 1000; 0 = held at ambient). A part in free air ' +
        '(no sink): its datasheet junction–ambient resistance R_th(j-a) less the Foster sum, with caseToSinkKPerW 0 and ' +
        'sinkHeatCapacityJPerK 0 (the whole R_th(j-a) here is a few per cent conservative)',
      { minimum: 0, maximum: 1000 },
    ),
    sinkHeatCapacityJPerK: num('Heat capacity of the sink in J/K (0 ≤ C ≤ 1e6; 0 = no thermal mass; aluminium ≈ 900 J/K per kg)', {
      minimum: 0,
      maximum: 1e6,
    }),
  },
  { additionalProperties: false },
);

/** One switching device (per switch; see the module note). */
export const DriverDeviceSchema = Type.Object(
  {
    role: Type.Union([Type.Literal('bridge'), Type.Literal('pass'), Type.Literal('modulator')], {
      description: 'bridge: the switches driving the coil; pass: linear rail regulator; modulator: buck rail switch',
    }),
    kind: Type.Union([Type.Literal('mosfet'), Type.Literal('igbt'), Type.Literal('bjt')], {
      description: 'Device type: mosfet, igbt, or bjt (bipolar junction transistor)',
    }),
    rdsOnOhm: Type.Optional(
      Type.Union([
        num('MOSFET on-resistance Rds(on) at 25 °C in Ω (0 < R ≤ 100); for an IGBT an optional slope resistance', {
          exclusiveMinimum: 0,
          maximum: 100,
        }),
        Type.Null(),
      ]),
    ),
    rdsOnTempCoeffPerK: Type.Optional(
      num(
        'Linear temperature coefficient α of Rds(on) in 1/K, Rds(Tj) = Rds(25 °C)·(1 + α(Tj − 25)) ' +
          '(0 ≤ α ≤ 0.015; silicon MOSFETs ≈ 0.005–0.01)',
        {
          minimum: 0,
          maximum: 0.015,
        },
      ),
    ),
    vceSatV: Type.Optional(
      Type.Union([
        num('Collector–emitter saturation voltage V_CE(sat) of an IGBT or BJT in V (0 < V ≤ 10)', { exclusiveMinimum: 0, maximum: 10 }),
        Type.Null(),
      ]),
    ),
    vceSatAtCurrentA: Type.Optional(
      Type.Union([
        num('BJT: the collector current at which the datasheet states V_CE(sat), in A (0 < I ≤ 1000)', { exclusiveMinimum: 0, maximum: 1000 }),
        Type.Null(),
      ]),
    ),
    forcedGain: Type.Optional(
      Type.Union([
        num(
          'BJT: forced current gain β_F = I_C/I_B that the base drive gives while on (1 ≤ β ≤ 1000; a feedback winding ' +
            'from the coil drives the base in proportion to the collector current); give this or baseCurrentA',
          { minimum: 1, maximum: 1000 },
        ),
        Type.Null(),
      ]),
    ),
    baseCurrentA: Type.Optional(
      Type.Union([
        num('BJT: base current while on, in A, for a base drive of fixed current (0 < I ≤ 100); give this or forcedGain', {
          exclusiveMinimum: 0,
          maximum: 100,
        }),
        Type.Null(),
      ]),
    ),
    vbeSatV: Type.Optional(
      Type.Union([num('BJT: base–emitter saturation voltage V_BE(sat) in V (0.3 ≤ V ≤ 3)', { minimum: 0.3, maximum: 3 }), Type.Null()]),
    ),
    storageTimeS: Type.Optional(
      num(
        'Storage time t_s in s (0 ≤ t ≤ 1e-4): a BJT needs its datasheet t_s; for a MOSFET or IGBT the turn-off delay ' +
          't_d(off) may be given (default 0). Counted in the transition share (t_r + t_f + t_s)·f',
        { minimum: 0, maximum: 1e-4 },
      ),
    ),
    riseTimeS: num('Switching rise time t_r in s (0 ≤ t ≤ 1e-5)', { minimum: 0, maximum: 1e-5 }),
    fallTimeS: num('Switching fall time t_f in s (0 ≤ t ≤ 1e-5)', { minimum: 0, maximum: 1e-5 }),
    outputCapacitanceF: num('Output capacitance C_oss (C_oes for an IGBT) in F (0 ≤ C ≤ 1e-7)', { minimum: 0, maximum: 1e-7 }),
    tjMaxC: num('Maximum junction temperature in °C (50 ≤ T ≤ 250)', { minimum: 50, maximum: 250 }),
    thermal: DeviceThermalSchema,
  },
  { additionalProperties: false },
);

/** Limits of the pulse (interrupted-drive) scheme. */
export const PulseLimitsSchema = Type.Object(
  {
    maxOnTimeS: num('Longest allowed pulse (on-time) in s (0 < t ≤ 0.1)', { exclusiveMinimum: 0, maximum: 0.1 }),
    minOffTimeS: num('Shortest allowed gap between pulses in s (0 ≤ t ≤ 10)', { minimum: 0, maximum: 10 }),
    maxDuty: num('Highest allowed overall duty (on-time fraction, 0 < D ≤ 1)', { exclusiveMinimum: 0, maximum: 1 }),
    minOnTimeS: Type.Optional(
      num(
        'Shortest pulse worth sending, in s (0 ≤ t ≤ 0.01): shorter pulses are dropped, counted and reported, since the ' +
          'coil cannot ring up in them. Default: 3 RF cycles at the coil’s resonance',
        { minimum: 0, maximum: 0.01 },
      ),
    ),
  },
  { additionalProperties: false },
);

/** A driver profile (see the module note for per-switch semantics). */
export const DriverProfileSchema = Type.Object(
  {
    name: Type.String({ minLength: 1, maxLength: 200, description: 'Display name' }),
    notes: Type.Optional(Type.String({ maxLength: 5000, description: 'Free text' })),
    topology: Type.Union([Type.Literal('half-bridge'), Type.Literal('full-bridge'), Type.Literal('single-switch')], {
      description: 'Bridge topology: 2, 4 or 1 bridge switches',
    }),
    supplyVoltageV: num('Supply (DC bus) voltage in V (0 < V ≤ 2000)', { exclusiveMinimum: 0, maximum: 2000 }),
    fullRailCurrentA: num('Supply current in A drawn by bridge and coil with the rail at the full supply voltage (0 < I ≤ 1000)', {
      exclusiveMinimum: 0,
      maximum: 1000,
    }),
    supplyCurrentLimitA: num('Most current the supply may deliver, in A (0 < I ≤ 10000)', { exclusiveMinimum: 0, maximum: 1e4 }),
    ambientC: num('Ambient (air) temperature in °C (−40 ≤ T ≤ 85)', { minimum: -40, maximum: 85 }),
    scheme: Type.Union([Type.Literal('rail-linear'), Type.Literal('rail-switched'), Type.Literal('pulse')], {
      description: 'Modulation scheme: linear pass regulator on the rail, buck (PWM) rail, or pulsed (interrupted) drive',
    }),
    pulse: Type.Optional(PulseLimitsSchema),
    pwmFrequencyHz: Type.Optional(num('Rail modulator (buck) PWM frequency in Hz (1e3 ≤ f ≤ 5e6)', { minimum: 1e3, maximum: 5e6 })),
    devices: Type.Array(DriverDeviceSchema, { minItems: 1, maxItems: 3, description: 'One entry per role (per switch)' }),
  },
  { additionalProperties: false },
);

/** A validated driver profile. */
export type DriverProfile = Static<typeof DriverProfileSchema>;
/** One device entry of a driver profile (per switch). */
export type DriverDevice = Static<typeof DriverDeviceSchema>;
/** Device role. */
export type DeviceRole = DriverDevice['role'];
/** Bridge topology. */
export type DriverTopology = DriverProfile['topology'];
/** Modulation scheme. */
export type DriverScheme = DriverProfile['scheme'];

/** Number of identical bridge switches per topology: half-bridge 2, full-bridge 4, single-switch 1. */
export const BRIDGE_SWITCH_COUNT: Readonly<Record<DriverTopology, number>> = {
  'half-bridge': 2,
  'full-bridge': 4,
  'single-switch': 1,
};

/** The device roles each scheme needs (every scheme needs a bridge). */
export const ROLES_FOR_SCHEME: Readonly<Record<DriverScheme, readonly DeviceRole[]>> = {
  'rail-linear': ['bridge', 'pass'],
  'rail-switched': ['bridge', 'modulator'],
  pulse: ['bridge'],
};

type SchemaNode = { [k: string]: unknown };

/** Picks the non-null branch of a nullable union. */
function resolve(node: SchemaNode | undefined): SchemaNode | undefined {
  const any = node?.anyOf as SchemaNode[] | undefined;
  return any && !any.every((s) => 'const' in s) ? any.find((s) => s.type !== 'null') : node;
}

/** Sub-schema at a JSON-pointer instance path (object properties, array items), unresolved at the end. */
function schemaAt(root: SchemaNode, pointer: string): SchemaNode | undefined {
  let node: SchemaNode | undefined = root;
  for (const part of pointer.split('/').slice(1)) {
    node = resolve(node);
    if (!node) return undefined;
    if (node.type === 'array') node = node.items as SchemaNode;
    else node = (node.properties as Record<string, SchemaNode> | undefined)?.[part];
  }
  return node;
}

const dotted = (pointer: string): string => pointer.split('/').slice(1).join('.');
const show = (v: unknown): string => (typeof v === 'string' ? `"${v}"` : v === undefined ? 'nothing' : JSON.stringify(v));
function valueAt(root: unknown, pointer: string): unknown {
  let v: unknown = root;
  for (const part of pointer.split('/').slice(1)) v = v !== null && typeof v === 'object' ? (v as Record<string, unknown>)[part] : undefined;
  return v;
}

const bad = (field: string, msg: string): InputError => new InputError('bad-profile', `driver profile: ${msg}`, field || undefined);

/** Turns the first TypeBox error into an InputError naming field, rule, value and what to do. */
function schemaError(json: unknown): InputError {
  const errors = [...Value.Errors(DriverProfileSchema, json)];
  const root = DriverProfileSchema as unknown as SchemaNode;
  const first = errors.find((e) => e.keyword !== 'additionalProperties') ?? errors[0];
  const path = first.instancePath;
  const field = dotted(path);
  const sub = schemaAt(root, path);
  const description = sub?.description ?? resolve(sub)?.description;
  const desc = description ? ` (${String(description)})` : '';
  const value = valueAt(json, path);
  if (first.keyword === 'boolean' && first.schemaPath.endsWith('additionalProperties')) {
    return bad(field, `unknown field ${field}: remove it or correct its spelling`);
  }
  if (first.keyword === 'required') {
    const missing = (first.params as { requiredProperties?: string[] }).requiredProperties ?? [];
    const f = [field, missing[0]].filter(Boolean).join('.');
    const m = schemaAt(root, `${path}/${missing[0]}`);
    const d = m?.description ?? resolve(m)?.description;
    return bad(f, `${f} is missing${d ? ` (${String(d)})` : ''}: add it`);
  }
  // A union: literal choices, or a nullable number.
  const any = sub?.anyOf as SchemaNode[] | undefined;
  if (first.schemaPath.includes('/anyOf/') || first.keyword === 'anyOf') {
    if (any && any.every((s) => 'const' in s)) {
      return bad(field, `${field} must be one of ${any.map((s) => show(s.const)).join(', ')}, got ${show(value)}${desc}: pick one of those`);
    }
    const ranged = errors.find((e) => e.instancePath === path && e.keyword !== 'type' && e.keyword !== 'anyOf');
    if (ranged) return rangeError(field, ranged.keyword, ranged.params as Record<string, unknown>, value, desc);
    return bad(field, `${field} must be a number or null, got ${show(value)}${desc}: give a number (or null where the device kind does not use it)`);
  }
  if (first.keyword === 'type') {
    const t = (first.params as { type?: string }).type;
    const want = t === 'object' ? 'an object' : t === 'array' ? 'a list' : `a finite ${t}`;
    return bad(field, `${field || 'the profile'} must be ${want}, got ${show(value)}${desc}: give ${want} there`);
  }
  return rangeError(field, first.keyword, first.params as Record<string, unknown>, value, desc);
}

function rangeError(field: string, keyword: string, params: Record<string, unknown>, value: unknown, desc: string): InputError {
  const rule: Record<string, string> = {
    minimum: `≥ ${String(params.limit)}`,
    maximum: `≤ ${String(params.limit)}`,
    exclusiveMinimum: `> ${String(params.limit)}`,
    exclusiveMaximum: `< ${String(params.limit)}`,
    minItems: `a list of at least ${String(params.limit)} entries`,
    maxItems: `a list of at most ${String(params.limit)} entries`,
    minLength: `a text of at least ${String(params.limit)} characters`,
    maxLength: `a text of at most ${String(params.limit)} characters`,
  };
  const r = rule[keyword];
  const got = Array.isArray(value) ? `${value.length} entries` : show(value);
  return bad(field, `${field} must be ${r ?? `valid (${keyword})`}, got ${got}${desc}: correct the value`);
}

/**
 * The figures a bipolar transistor needs beyond the schema: V_CE(sat) with the collector current it
 * is stated at, V_BE(sat), the storage time, and exactly one of the forced gain or the base current.
 */
function checkBjt(d: DriverDevice, at: string): void {
  const need: [keyof DriverDevice, string][] = [
    ['vceSatV', 'its collector–emitter saturation voltage V_CE(sat) in V'],
    ['vceSatAtCurrentA', 'the collector current in A at which the datasheet states V_CE(sat)'],
    ['vbeSatV', 'its base–emitter saturation voltage V_BE(sat) in V'],
    ['storageTimeS', 'its storage time t_s in s'],
  ];
  for (const [key, what] of need) {
    const v = d[key];
    if (v === undefined || v === null) throw bad(`${at}.${key}`, `${at}.${key} is ${show(v)} but a BJT needs ${what}: add it from the datasheet`);
  }
  const hasGain = d.forcedGain !== undefined && d.forcedGain !== null;
  const hasBase = d.baseCurrentA !== undefined && d.baseCurrentA !== null;
  if (hasGain === hasBase) {
    throw bad(
      `${at}.forcedGain`,
      `${at} gives ${hasGain ? 'both forcedGain and baseCurrentA' : 'neither forcedGain nor baseCurrentA'} but a BJT needs exactly one: ` +
        'forcedGain (I_C/I_B) for a base drive that follows the collector current, baseCurrentA (A) for a fixed one',
    );
  }
}

/**
 * Validates a driver profile (already JSON-parsed) and returns it typed. Throws
 * `InputError('bad-profile', message, field)` naming the dotted field path (e.g.
 * `devices.0.thermal.foster`), the rule, the value given and what to do. Checks, beyond the
 * schema's types and ranges: a non-empty Foster list; `pulse` present for the pulse scheme and
 * `pwmFrequencyHz` for rail-switched; exactly one device per role, with the roles the scheme
 * needs (rail-linear: bridge + pass; rail-switched: bridge + modulator; pulse: bridge); a MOSFET
 * has `rdsOnOhm` and `rdsOnTempCoeffPerK`, an IGBT `vceSatV`, a BJT `vceSatV`, `vceSatAtCurrentA`,
 * `vbeSatV`, `storageTimeS` and one of `forcedGain` or `baseCurrentA`; ambient below every Tj max;
 * `pulse.minOnTimeS` at most `pulse.maxOnTimeS`.
 * A sink heat capacity of 0 is valid (a sink without thermal mass). Devices of roles the scheme
 * does not use are allowed (the simulation ignores them and says so).
 *
 * @example parseDriverProfile(JSON.parse(text)).scheme // → 'rail-linear'
 */
export function parseDriverProfile(json: unknown): DriverProfile {
  if (!Value.Check(DriverProfileSchema, json)) throw schemaError(json);
  const p = json as DriverProfile;
  p.devices.forEach((d, i) => {
    const at = `devices.${i}`;
    if (d.thermal.foster.length === 0) {
      throw bad(`${at}.thermal.foster`, `${at}.thermal.foster is empty: give the datasheet's junction–case Foster set, at least one { "rKPerW", "tauS" } cell`);
    }
    if (d.kind === 'mosfet') {
      if (d.rdsOnOhm === undefined || d.rdsOnOhm === null) {
        throw bad(`${at}.rdsOnOhm`, `${at}.rdsOnOhm is ${show(d.rdsOnOhm)} but a MOSFET needs its on-resistance Rds(on) at 25 °C in Ω: add it from the datasheet`);
      }
      if (d.rdsOnTempCoeffPerK === undefined) {
        throw bad(
          `${at}.rdsOnTempCoeffPerK`,
          `${at}.rdsOnTempCoeffPerK is missing but a MOSFET needs the temperature coefficient of Rds(on) in 1/K: ` +
            "read it from the datasheet's normalised Rds(on)-vs-Tj curve (silicon ≈ 0.007)",
        );
      }
    } else if (d.kind === 'igbt') {
      if (d.vceSatV === undefined || d.vceSatV === null) {
        throw bad(`${at}.vceSatV`, `${at}.vceSatV is ${show(d.vceSatV)} but an IGBT needs its collector–emitter saturation voltage in V: add it from the datasheet`);
      }
    } else checkBjt(d, at);
    if (d.tjMaxC <= p.ambientC) {
      throw bad(`${at}.tjMaxC`, `${at}.tjMaxC must be above ambientC (${p.ambientC} °C), got ${d.tjMaxC} °C: check both temperatures`);
    }
    const dup = p.devices.findIndex((e, j) => j < i && e.role === d.role);
    if (dup >= 0) {
      throw bad(`${at}.role`, `${at}.role "${d.role}" repeats devices.${dup}: give one entry per role (it describes each identical switch of that role)`);
    }
  });
  if (p.pulse?.minOnTimeS !== undefined && p.pulse.minOnTimeS > p.pulse.maxOnTimeS) {
    throw bad(
      'pulse.minOnTimeS',
      `pulse.minOnTimeS (${p.pulse.minOnTimeS} s) is longer than pulse.maxOnTimeS (${p.pulse.maxOnTimeS} s), so no pulse could be sent: lower the minimum or raise the maximum`,
    );
  }
  if (p.scheme === 'pulse' && p.pulse === undefined) {
    throw bad('pulse', 'pulse is missing but the pulse scheme needs it: add { "maxOnTimeS", "minOffTimeS", "maxDuty" }');
  }
  if (p.scheme === 'rail-switched' && p.pwmFrequencyHz === undefined) {
    throw bad('pwmFrequencyHz', 'pwmFrequencyHz is missing but the rail-switched scheme needs the modulator’s PWM frequency in Hz: add it');
  }
  for (const role of ROLES_FOR_SCHEME[p.scheme]) {
    if (!p.devices.some((d) => d.role === role)) {
      throw bad('devices', `devices has no "${role}" device but the ${p.scheme} scheme needs one: add an entry with "role": "${role}"`);
    }
  }
  return p;
}

/**
 * The device entry of a role, or null when the profile has none.
 *
 * @example deviceOfRole(DEMO_DRIVER_LINEAR, 'pass')?.kind // → 'mosfet'
 */
export function deviceOfRole(profile: DriverProfile, role: DeviceRole): DriverDevice | null {
  return profile.devices.find((d) => d.role === role) ?? null;
}
