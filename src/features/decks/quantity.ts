// Numbers with units in deck forms. Decks store SI values (1e-8 m); people type and
// read them in engineering notation ("10 nm", "10n", "0.01u", "1e-8"). A form field is
// a string that parses to the SI value and then meets the field's own zod schema
// (the rule's parameter, the corner field), so the ranges enforced are exactly the ones
// the server applies; only the wording of the messages is ours, with units.

import { zodResolver } from '@hookform/resolvers/zod';
import type { FieldValues, Resolver } from 'react-hook-form';
import { z } from 'zod';

const PREFIXES: Record<string, number> = { T: 1e12, G: 1e9, M: 1e6, k: 1e3, m: 1e-3, u: 1e-6, µ: 1e-6, μ: 1e-6, n: 1e-9, p: 1e-12, f: 1e-15, a: 1e-18 };
const DISPLAY: [number, string][] = [
  [1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'], [1e-15, 'f'], [1e-18, 'a'],
];

/** Units shown without engineering prefixes: temperatures, ratios, counts, and units a prefix would garble (m1/V, m√V). */
const PLAIN_UNITS = new Set(['°C', 'ratio', 'count', '', 'V/V', '1/V', '√V']);

/** The unit as people read it beside a value; a ratio has none. */
export function unitLabel(unit: string | undefined): string {
  if (!unit || unit === 'ratio' || unit === 'count') return '';
  return unit;
}

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?/i;

/**
 * Parse "10 nm", "10n", "1.5e-6", "2.5 V", "430 mV", "10 %" (ratios) into SI. The unit
 * may be left out; when the text ends in the unit itself it is the unit, not a prefix
 * ("1 m" is a metre, "1 mm" a millimetre). Null when the text is not a number.
 */
export function parseQuantity(text: string, unit = ''): number | null {
  let rest = text.trim().replace(/\s+/g, ' ');
  if (rest === '') return null;
  const u = unitLabel(unit);
  if (unit === 'ratio' && rest.endsWith('%')) {
    const v = parseQuantity(rest.slice(0, -1), '');
    return v === null ? null : v / 100;
  }
  if (u && rest.endsWith(u)) rest = rest.slice(0, -u.length).trimEnd();
  const number = NUMBER.exec(rest);
  if (!number) return null;
  const value = Number(number[0]);
  const suffix = rest.slice(number[0].length).trim();
  if (suffix === '') return Number.isFinite(value) ? value : null;
  if (PLAIN_UNITS.has(unit) && unit !== '') return null;
  const scale = PREFIXES[suffix];
  if (scale === undefined) return null;
  // Twelve significant digits: "0.3 µ" is 3e-7 exactly as typed, not 2.9999999999999997e-7.
  return Number((value * scale).toPrecision(12));
}

/** A value as the form shows it: engineering prefix, full precision, the unit. */
export function formatQuantity(value: number, unit = ''): string {
  const u = unitLabel(unit);
  if (!Number.isFinite(value)) return String(value);
  const plain = (v: number) => String(Number(v.toPrecision(12)));
  if (PLAIN_UNITS.has(unit) || value === 0) return `${plain(value)}${u ? ` ${u}` : ''}`;
  const abs = Math.abs(value);
  for (const [scale, prefix] of DISPLAY) {
    if (abs >= scale * 0.9995) return `${plain(value / scale)} ${prefix}${u}`.trim();
  }
  return `${value.toExponential()} ${u}`.trim();
}

// ---- reading a zod field ----------------------------------------------------------

export interface FieldInfo {
  kind: 'number' | 'integer' | 'boolean' | 'enum' | 'string' | 'object' | 'other';
  unit: string;
  label: string;
  min?: number;
  max?: number;
  options?: string[];
  defaultValue?: unknown;
}

type AnyDef = { type: string; innerType?: z.ZodType; defaultValue?: unknown; entries?: Record<string, string> };

/** What a field is, with the `.meta({ unit, label })` of its outermost wrapper and the range of its number. */
export function fieldInfo(field: z.ZodType): FieldInfo {
  const meta = (field.meta() ?? {}) as { unit?: string; label?: string };
  let inner: z.ZodType = field;
  let defaultValue: unknown;
  for (;;) {
    const def = inner._zod.def as AnyDef;
    if ((def.type === 'default' || def.type === 'optional' || def.type === 'nullable' || def.type === 'prefault') && def.innerType) {
      if (def.type === 'default') defaultValue = typeof def.defaultValue === 'function' ? (def.defaultValue as () => unknown)() : def.defaultValue;
      inner = def.innerType;
      continue;
    }
    break;
  }
  const base = { unit: meta.unit ?? '', label: meta.label ?? '', defaultValue };
  if (inner instanceof z.ZodNumber) {
    const min = inner.minValue ?? undefined;
    const max = inner.maxValue ?? undefined;
    return { ...base, kind: inner.isInt ? 'integer' : 'number', min: Number.isFinite(min) ? min : undefined, max: Number.isFinite(max) ? max : undefined };
  }
  if (inner instanceof z.ZodBoolean) return { ...base, kind: 'boolean' };
  if (inner instanceof z.ZodEnum) return { ...base, kind: 'enum', options: inner.options.map(String) };
  if (inner instanceof z.ZodString) return { ...base, kind: 'string' };
  if (inner instanceof z.ZodObject) return { ...base, kind: 'object' };
  return { ...base, kind: 'other' };
}

/** "10 nm … 10 µm", "at most 0.5", for hints. */
export function rangeText(info: FieldInfo): string {
  const f = (v: number) => formatQuantity(v, info.unit);
  if (info.min !== undefined && info.max !== undefined) return `${f(info.min)} … ${f(info.max)}`;
  if (info.min !== undefined) return `at least ${f(info.min)}`;
  if (info.max !== undefined) return `at most ${f(info.max)}`;
  return '';
}

// ---- form schemas -------------------------------------------------------------------

/** Marks a number field's string stage so its messages can name the unit. */
const NOT_A_NUMBER = 'keepwell:not-a-number';

/** A text field that parses to SI and then must pass `field` itself. */
export function quantityField(field: z.ZodType, unit: string) {
  return z
    .string()
    .transform((text, ctx) => {
      const value = parseQuantity(text, unit);
      if (value === null) {
        ctx.addIssue({ code: 'custom', message: NOT_A_NUMBER, input: text });
        return z.NEVER;
      }
      return value;
    })
    .pipe(field as z.ZodType<unknown, number>);
}

/**
 * The form version of an object schema: numbers become quantity text fields (each
 * piped into the original field), nested objects recurse, the rest stays as it is.
 */
export function formSchemaOf(object: z.ZodObject): z.ZodObject {
  const shape: Record<string, z.ZodType> = {};
  for (const [key, field] of Object.entries(object.shape as Record<string, z.ZodType>)) {
    const info = fieldInfo(field);
    if (info.kind === 'number' || info.kind === 'integer') shape[key] = quantityField(field, info.unit);
    else if (info.kind === 'object') shape[key] = formSchemaOf(unwrapObject(field));
    else shape[key] = field;
  }
  return z.object(shape);
}

function unwrapObject(field: z.ZodType): z.ZodObject {
  let inner = field;
  while (!(inner instanceof z.ZodObject)) inner = (inner._zod.def as AnyDef).innerType!;
  return inner;
}

/** Form values of an object: numbers as their display text. */
export function toFormValues(object: z.ZodObject, value: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, field] of Object.entries(object.shape as Record<string, z.ZodType>)) {
    const info = fieldInfo(field);
    const v = value[key] ?? info.defaultValue;
    if ((info.kind === 'number' || info.kind === 'integer') && typeof v === 'number') out[key] = formatQuantity(v, info.unit);
    else if (info.kind === 'object') out[key] = toFormValues(unwrapObject(field), (v ?? {}) as Record<string, unknown>);
    else out[key] = v;
  }
  return out;
}

/** Find the schema of the field at a form path (`params.maxWidth`, `corners.1.nmos.vt0`). */
function fieldAt(schema: z.ZodType, path: string[]): z.ZodType | undefined {
  let node: z.ZodType | undefined = schema;
  for (const key of path) {
    while (node && !(node instanceof z.ZodObject) && !(node instanceof z.ZodArray) && (node._zod.def as AnyDef).innerType) node = (node._zod.def as AnyDef).innerType;
    if (node instanceof z.ZodObject) node = (node.shape as Record<string, z.ZodType>)[key];
    else if (node instanceof z.ZodArray) node = node.element as z.ZodType;
    else return undefined;
  }
  return node;
}

/** The message for one failed field, in the field's own unit: "At most 1 mm.", "At least 10 nm.". */
export function quantityMessage(type: string, message: string, info: FieldInfo | undefined): string {
  const unit = info?.unit ?? '';
  const u = unitLabel(unit);
  if (message === NOT_A_NUMBER) {
    if (!u) return 'Enter a number, such as 0.25 or 25 %.';
    return PLAIN_UNITS.has(unit) ? `Enter a number in ${u}.` : `Enter a number in ${u}, with or without a prefix: 2.5 n${u}, 2.5n or 2.5e-9.`;
  }
  if (type === 'too_big' && info?.max !== undefined) return `At most ${formatQuantity(info.max, unit)}.`;
  if (type === 'too_small' && info?.min !== undefined && (info.kind === 'number' || info.kind === 'integer')) return `At least ${formatQuantity(info.min, unit)}.`;
  if (type === 'too_small' && info?.kind === 'string') return 'This cannot be empty.';
  if (type === 'too_big' && info?.kind === 'string') return 'This is too long.';
  if (type === 'invalid_format') return 'Letters, digits, dot, dash and underscore only.';
  if (type === 'invalid_type' && info?.kind === 'integer') return 'A whole number.';
  return message;
}

type FieldErrorNode = { type?: unknown; message?: unknown; [key: string]: unknown };

function rewriteErrors(node: FieldErrorNode, source: z.ZodType, path: string[]) {
  if (typeof node.type === 'string' && typeof node.message === 'string') {
    const field = fieldAt(source, path);
    node.message = quantityMessage(node.type, node.message, field ? fieldInfo(field) : undefined);
    return;
  }
  for (const [key, child] of Object.entries(node)) {
    if (key !== 'ref' && child && typeof child === 'object') rewriteErrors(child as FieldErrorNode, source, [...path, key]);
  }
}

/**
 * react-hook-form's zod resolver over the form version of `source` (see formSchemaOf),
 * with each field's message worded in its unit. `source` is the schema the values must
 * finally meet: a rule's own parameter schema, the shared corner schema.
 */
export function quantityResolver<V extends FieldValues>(formSchema: z.ZodType, source: z.ZodType): Resolver<V> {
  const resolve = zodResolver(formSchema as never) as unknown as Resolver<V>;
  return async (values, context, options) => {
    const result = await resolve(values, context, options);
    rewriteErrors(result.errors as FieldErrorNode, source, []);
    return result;
  };
}
