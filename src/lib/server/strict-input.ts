/**
 * Makes a shared (form-friendly) zod schema strict for the API, once, by walking it:
 * - JSON bodies: numbers must already be JSON numbers (`z.coerce.number()` loses its coercion, so
 *   "0x5F", "95", [95] and true are refused with the schema's own "must be a number" words);
 *   coerced dates take only ISO 8601 strings with a zone naming a real calendar day; every object
 *   refuses unknown keys (named by `zodFields`); strings are normalised to Unicode NFC.
 * - Query strings and path parameters (always text): numbers only as plain decimals.
 * Schemas are rebuilt from their zod definitions, so messages, limits and refinements stay as written.
 */
import {
  z,
  ZodArray,
  ZodBoolean,
  ZodBranded,
  ZodCatch,
  ZodDate,
  ZodDefault,
  ZodDiscriminatedUnion,
  ZodEffects,
  ZodIntersection,
  ZodLazy,
  ZodNullable,
  ZodNumber,
  ZodObject,
  ZodOptional,
  ZodPipeline,
  ZodReadonly,
  ZodRecord,
  ZodString,
  ZodTuple,
  ZodUnion,
  type ZodTypeAny,
} from 'zod';
import { isRealIsoDate, isRealIsoDateTime } from '~/lib/time/iso.ts';

type Mode = 'json' | 'text';
const caches: Record<Mode, WeakMap<ZodTypeAny, ZodTypeAny>> = { json: new WeakMap(), text: new WeakMap() };
const DECIMAL = /^-?\d+(\.\d+)?$/;

function messageOf(def: { errorMap?: z.ZodErrorMap }, fallback: string): string {
  try {
    return (
      def.errorMap?.(
        {
          code: 'invalid_type',
          expected: 'date',
          received: 'string',
          path: [],
          message: undefined,
        } as z.ZodIssueOptionalMessage,
        { defaultError: fallback, data: undefined },
      )?.message ?? fallback
    );
  } catch {
    return fallback;
  }
}

function walk(schema: ZodTypeAny, mode: Mode): ZodTypeAny {
  const cached = caches[mode].get(schema);
  if (cached) return cached;
  const out = rebuild(schema, mode);
  caches[mode].set(schema, out);
  return out;
}

function rebuild(s: ZodTypeAny, mode: Mode): ZodTypeAny {
  // biome-ignore lint/suspicious/noExplicitAny: zod 3's internal _def has no public type
  const def = (s as any)._def;
  const w = (x: ZodTypeAny) => walk(x, mode);
  if (s instanceof ZodObject) {
    const shape = Object.fromEntries(Object.entries(s.shape as Record<string, ZodTypeAny>).map(([k, v]) => [k, w(v)]));
    return new ZodObject({
      ...def,
      shape: () => shape,
      unknownKeys: mode === 'json' && def.unknownKeys !== 'passthrough' ? 'strict' : def.unknownKeys,
    });
  }
  if (s instanceof ZodNumber) {
    const strict = new ZodNumber({ ...def, coerce: false });
    if (mode === 'json' || !def.coerce) return strict;
    return z.preprocess((v) => (typeof v === 'string' && DECIMAL.test(v) ? Number(v) : v), strict);
  }
  if (s instanceof ZodDate) {
    if (!def.coerce) return s;
    const plain = new ZodDate({ ...def, coerce: false });
    const message = messageOf(def, 'must be a date and time');
    return z
      .custom<string>((v) => typeof v === 'string' && isRealIsoDateTime(v), {
        message: `${message} (ISO 8601 with Z or an offset, on a real calendar day)`,
      })
      .transform((v) => new Date(v))
      .pipe(plain);
  }
  if (s instanceof ZodString) {
    const strict = new ZodString({ ...def, coerce: false });
    const checks: { kind: string }[] = def.checks ?? [];
    let out: ZodTypeAny = strict;
    if (checks.some((c) => c.kind === 'datetime'))
      out = strict.refine((v) => isRealIsoDateTime(v), 'is not a real date and time');
    else if (checks.some((c) => c.kind === 'date')) out = strict.refine((v) => isRealIsoDate(v), 'is not a real date');
    if (mode === 'json') return z.preprocess((v) => (typeof v === 'string' ? v.normalize('NFC') : v), out);
    return out;
  }
  if (s instanceof ZodBoolean) return def.coerce ? new ZodBoolean({ ...def, coerce: false }) : s;
  if (s instanceof ZodArray) return new ZodArray({ ...def, type: w(def.type) });
  if (s instanceof ZodOptional) return new ZodOptional({ ...def, innerType: w(def.innerType) });
  if (s instanceof ZodNullable) return new ZodNullable({ ...def, innerType: w(def.innerType) });
  if (s instanceof ZodDefault) return new ZodDefault({ ...def, innerType: w(def.innerType) });
  if (s instanceof ZodCatch) return new ZodCatch({ ...def, innerType: w(def.innerType) });
  if (s instanceof ZodReadonly) return new ZodReadonly({ ...def, innerType: w(def.innerType) });
  if (s instanceof ZodBranded) return new ZodBranded({ ...def, type: w(def.type) });
  if (s instanceof ZodEffects) return new ZodEffects({ ...def, schema: w(def.schema) });
  if (s instanceof ZodUnion) return new ZodUnion({ ...def, options: def.options.map(w) });
  if (s instanceof ZodDiscriminatedUnion) {
    const options = [...s.options].map(w) as ZodObject<z.ZodRawShape>[];
    return z.discriminatedUnion(
      def.discriminator,
      options as [ZodObject<z.ZodRawShape>, ...ZodObject<z.ZodRawShape>[]],
    );
  }
  if (s instanceof ZodIntersection) return new ZodIntersection({ ...def, left: w(def.left), right: w(def.right) });
  if (s instanceof ZodPipeline) return new ZodPipeline({ ...def, in: w(def.in), out: def.out });
  if (s instanceof ZodRecord) return new ZodRecord({ ...def, valueType: w(def.valueType) });
  if (s instanceof ZodTuple)
    return new ZodTuple({ ...def, items: def.items.map(w), rest: def.rest ? w(def.rest) : null });
  if (s instanceof ZodLazy) return z.lazy(() => w(def.getter()));
  return s;
}

// biome-ignore lint/suspicious/noExplicitAny: zod's input type parameter is any for every schema
type Any<T> = z.ZodType<T, z.ZodTypeDef, any>;
export const strictJsonSchema = <T>(schema: Any<T>): Any<T> => walk(schema as ZodTypeAny, 'json') as Any<T>;
export const strictTextSchema = <T>(schema: Any<T>): Any<T> => walk(schema as ZodTypeAny, 'text') as Any<T>;
