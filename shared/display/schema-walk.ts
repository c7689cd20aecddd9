/**
 * Reading a TypeBox (JSON Schema) object schema as a form: which kind of input each node wants,
 * its unit, its bounds and its help text, and immutable get/set of values by dotted path. The web
 * client's forms are generated from the profile schemas through these functions, so a field added
 * to a schema appears in the form with its unit, bounds and description, without a form change.
 * Pure, no DOM: tested in Node.
 */

/** The JSON Schema keywords a profile schema uses (TypeBox emits plain JSON Schema). */
export interface SchemaNode {
  type?: string;
  const?: unknown;
  anyOf?: SchemaNode[];
  properties?: Record<string, SchemaNode>;
  required?: string[];
  items?: SchemaNode;
  minItems?: number;
  maxItems?: number;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  minLength?: number;
  maxLength?: number;
  description?: string;
}

/** What kind of input a schema node becomes. */
export type FieldKind =
  | { kind: 'number'; integer: boolean; nullable: boolean; bounds: NumberBounds }
  | { kind: 'text'; minLength: number | null; maxLength: number | null; long: boolean }
  | { kind: 'choice'; options: string[] }
  | { kind: 'object'; properties: [string, SchemaNode][] }
  | { kind: 'variants'; tag: string; variants: { value: string; schema: SchemaNode }[] }
  | { kind: 'list'; item: SchemaNode; minItems: number; maxItems: number }
  | { kind: 'unknown' };

/**
 * Bounds for a number input. `min`/`max` are the schema's inclusive bounds; an exclusive bound
 * is kept as its own flag (the browser's min/max are inclusive, so the form states "above 0"
 * in words and the validator rejects 0 itself).
 */
export interface NumberBounds {
  min: number | null;
  max: number | null;
  minExclusive: boolean;
  maxExclusive: boolean;
}

const isLiteral = (n: SchemaNode): boolean => n.const !== undefined;
const isNull = (n: SchemaNode): boolean => n.type === 'null';

/** The input kind of a schema node (see FieldKind). */
export function fieldKind(node: SchemaNode): FieldKind {
  if (node.anyOf) {
    const alts = node.anyOf;
    if (alts.length > 0 && alts.every(isLiteral)) return { kind: 'choice', options: alts.map((a) => String(a.const)) };
    const nonNull = alts.filter((a) => !isNull(a));
    if (nonNull.length === 1 && (nonNull[0].type === 'number' || nonNull[0].type === 'integer')) {
      const inner = fieldKind(nonNull[0]);
      return inner.kind === 'number' ? { ...inner, nullable: true } : inner;
    }
    if (nonNull.length > 0 && nonNull.every((a) => a.type === 'object' && a.properties)) {
      const tag = discriminator(nonNull);
      if (tag) return { kind: 'variants', tag, variants: nonNull.map((s) => ({ value: String(s.properties![tag].const), schema: s })) };
    }
    return { kind: 'unknown' };
  }
  if (isLiteral(node)) return { kind: 'choice', options: [String(node.const)] };
  switch (node.type) {
    case 'number':
    case 'integer':
      return { kind: 'number', integer: node.type === 'integer', nullable: false, bounds: numberBounds(node) };
    case 'string':
      return { kind: 'text', minLength: node.minLength ?? null, maxLength: node.maxLength ?? null, long: (node.maxLength ?? 0) > 1000 };
    case 'object':
      return { kind: 'object', properties: Object.entries(node.properties ?? {}) };
    case 'array':
      return node.items ? { kind: 'list', item: node.items, minItems: node.minItems ?? 0, maxItems: node.maxItems ?? Infinity } : { kind: 'unknown' };
    default:
      return { kind: 'unknown' };
  }
}

/** The property every alternative fixes to a distinct literal (e.g. a top load's `shape`), or null. */
function discriminator(alts: SchemaNode[]): string | null {
  for (const key of Object.keys(alts[0].properties ?? {})) {
    const values = alts.map((a) => a.properties?.[key]?.const);
    if (values.every((v) => typeof v === 'string') && new Set(values).size === alts.length) return key;
  }
  return null;
}

function numberBounds(n: SchemaNode): NumberBounds {
  return {
    min: n.minimum ?? n.exclusiveMinimum ?? null,
    max: n.maximum ?? n.exclusiveMaximum ?? null,
    minExclusive: n.minimum === undefined && n.exclusiveMinimum !== undefined,
    maxExclusive: n.maximum === undefined && n.exclusiveMaximum !== undefined,
  };
}

/** Unit suffixes of coilcue's field names (DEVELOPERS.md: the unit in every name), longest first. */
const UNIT_SUFFIXES: [string, string][] = [
  ['JPerK', 'J/K'],
  ['KPerW', 'K/W'],
  ['PerK', '1/K'],
  ['Ohm', 'Ω'],
  ['Dbfs', 'dBFS'],
  ['Dbtp', 'dBTP'],
  ['Lufs', 'LUFS'],
  ['Db', 'dB'],
  ['Hz', 'Hz'],
  ['S', 's'],
  ['M', 'm'],
  ['F', 'F'],
  ['V', 'V'],
  ['A', 'A'],
  ['W', 'W'],
  ['C', '°C'],
  ['K', 'K'],
];

/**
 * The unit of a field from its name's suffix (`windingLengthM` → "m", `tjMaxC` → "°C"), or "" for
 * a count or a ratio. Only a capitalised suffix after a lower-case letter or digit counts, so
 * `maxDuty` has none.
 */
export function unitOfKey(key: string): string {
  for (const [suffix, unit] of UNIT_SUFFIXES) {
    if (key.length > suffix.length && key.endsWith(suffix) && /[a-z0-9]/.test(key[key.length - suffix.length - 1])) return unit;
  }
  return '';
}

/** Plain words for a field name without its unit suffix: `formDiameterM` → "form diameter". */
export function labelOfKey(key: string): string {
  const unit = unitOfKey(key);
  let base = key;
  if (unit) {
    const suffix = UNIT_SUFFIXES.find(([, u]) => u === unit)![0];
    base = key.slice(0, key.length - suffix.length);
  }
  const words = base.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/([A-Z]+)([A-Z][a-z])/g, '$1 $2').toLowerCase();
  return words.replace(/\btj\b/, 'Tj').replace(/\brds\b/, 'Rds').replace(/\bvce\b/, 'Vce').replace(/\bpwm\b/, 'PWM');
}

/** Words for the bounds: "0.005 to 2", "above 0, at most 100", "at least 0". */
export function boundsInWords(b: NumberBounds): string {
  const lo = b.min === null ? null : b.minExclusive ? `above ${b.min}` : `at least ${b.min}`;
  const hi = b.max === null ? null : b.maxExclusive ? `below ${b.max}` : `at most ${b.max}`;
  if (lo && hi && !b.minExclusive && !b.maxExclusive) return `${b.min} to ${b.max}`;
  return [lo, hi].filter(Boolean).join(', ');
}

/** Whether `v` lies within the bounds (and is whole where `integer`). */
export function withinBounds(v: number, b: NumberBounds, integer = false): boolean {
  if (!Number.isFinite(v)) return false;
  if (integer && !Number.isInteger(v)) return false;
  if (b.min !== null && (b.minExclusive ? !(v > b.min) : !(v >= b.min))) return false;
  if (b.max !== null && (b.maxExclusive ? !(v < b.max) : !(v <= b.max))) return false;
  return true;
}

/** Dotted path → keys ("devices.0.tjMaxC" → ["devices", "0", "tjMaxC"]). */
const keysOf = (path: string): string[] => (path === '' ? [] : path.split('.'));

/** The value at a dotted path, or undefined. */
export function getAt(root: unknown, path: string): unknown {
  let v: unknown = root;
  for (const k of keysOf(path)) v = v !== null && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined;
  return v;
}

/**
 * A copy of `root` with the value at `path` replaced (arrays stay arrays); `undefined` removes
 * the key from its object, so an emptied optional field is absent, as in a profile file.
 */
export function setAt<T>(root: T, path: string, value: unknown): T {
  const keys = keysOf(path);
  if (keys.length === 0) return value as T;
  const [head, ...rest] = keys;
  const src = (root ?? {}) as Record<string, unknown> | unknown[];
  const child = setAt((src as Record<string, unknown>)[head], rest.join('.'), value);
  if (Array.isArray(src)) {
    const copy = [...src];
    copy[Number(head)] = child;
    return copy as T;
  }
  const copy: Record<string, unknown> = { ...src };
  if (child === undefined) delete copy[head];
  else copy[head] = child;
  return copy as T;
}

/** A starting value for a schema node: bounds' lower end for numbers, the first choice, empty lists. */
export function defaultFor(node: SchemaNode): unknown {
  const k = fieldKind(node);
  switch (k.kind) {
    case 'number':
      return k.nullable ? null : k.bounds.min !== null && !k.bounds.minExclusive ? k.bounds.min : k.bounds.max !== null ? Math.min(1, k.bounds.max) : 0;
    case 'text':
      return '';
    case 'choice':
      return k.options[0];
    case 'object': {
      const out: Record<string, unknown> = {};
      for (const [key, sub] of k.properties) if ((node.required ?? []).includes(key)) out[key] = defaultFor(sub);
      return out;
    }
    case 'variants':
      return defaultFor(k.variants[0].schema);
    case 'list':
      return Array.from({ length: k.minItems }, () => defaultFor(k.item));
    default:
      return null;
  }
}

/** The help text of a node: its own description, or that of its non-null alternative. */
export function describeNode(node: SchemaNode): string {
  if (node.description) return node.description;
  const inner = node.anyOf?.find((a) => !isNull(a) && a.description);
  return inner?.description ?? '';
}

/** Whether an object schema requires `key` (absent keys are optional, as TypeBox's Optional writes them). */
export const isRequired = (node: SchemaNode, key: string): boolean => (node.required ?? []).includes(key);
