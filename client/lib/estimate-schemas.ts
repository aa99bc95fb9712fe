import { array, boolean, check, nullable, number, object, optional, record, refine, string, type Check, type Infer } from './check';

/**
 * The answers the live estimate needs, checked with the light checks of check.ts rather than zod:
 * Today fetches them on a sampler's first visit, and zod (about 24 KiB on the wire) would come
 * with them. Loaded with their queries' first fetch (lib/estimate-inputs.ts), not with the first
 * screen. tests/client/estimate-schemas.test.ts holds them against the zod schemas they replace.
 * The Fit inside a calibration is checked by the estimation core itself (assertFit) when it is used.
 */

/** The checked object's type, a key that may be undefined being optional (as zod infers it). */
type Shape<S extends Record<string, Check<unknown>>> = { [K in keyof S as undefined extends Infer<S[K]> ? never : K]: Infer<S[K]> } & {
  [K in keyof S as undefined extends Infer<S[K]> ? K : never]?: Infer<S[K]>;
} & Record<string, unknown>;

/** An object whose named keys are checked and whose other keys are kept as they are (zod's looseObject). */
function looseObject<S extends Record<string, Check<unknown>>>(shape: S): Check<Shape<S>> {
  const strict = object(shape);
  return check((v) => ({ ...(v as object), ...strict.run(v) }) as Shape<S>);
}

const numberOrString = check((v) => (typeof v === 'string' ? v : number.run(v)));
const pair = refine(array(number), (a) => a.length === 2) as Check<unknown> as Check<[number, number]>;
/** A plain object of anything (zod's record of string keys to unknown). */
const anyRecord = record(check((v) => v));
const maybe = <T>(c: Check<T>) => optional(nullable(c));

export const calibrationItemSchema = looseObject({
  id: string(),
  crop: string(),
  variety: maybe(string()),
  version: numberOrString,
  model: string(),
  n: optional(number),
  xRange: optional(pair),
  fit: anyRecord,
  assigned: optional(boolean),
});

export const calibrationsResponseSchema = object({ items: array(calibrationItemSchema), total: number });

export const rulesSchema = looseObject({
  thresholdKgHa: refine(number, (n) => n > 0),
  minDaysInWindow: optional(number),
  label: maybe(string()),
  // How the verdict is decided and where stops may go (client/lib/rule-settings.ts fills in the
  // demo values while a server leaves them out). Loose here so an odd value never blanks the rule.
  id: maybe(string()),
  version: maybe(number),
  decisionBasis: maybe(string()),
  confidence: maybe(number),
  minPlants: maybe(number),
  edgeMarginM: maybe(number),
});
