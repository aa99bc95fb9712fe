/**
 * A few lines of answer checking for the first screen, so zod (about 26 KB gzipped) is not part of
 * it: the session and today's list are checked with these, later answers with the shared zod
 * schemas (loaded with the screens that use them). Same contract as zod's safeParse: objects keep
 * only the keys they name; anything else fails. client/lib/first-screen-answers.ts holds the
 * checks, and tests/client/first-screen-answers.test.ts holds them against the zod schemas.
 */

export type Parsed<T> = { success: true; data: T } | { success: false };

/** What the API client needs of a schema: zod's schemas fit this too. */
export interface Parser<T> {
  safeParse(input: unknown): Parsed<T>;
}

/** Throws on a mismatch inside a check; caught once at the top (safeParse). */
const FAIL = Symbol('mismatch');
type Run<T> = (input: unknown) => T;

export interface Check<T> extends Parser<T> {
  readonly run: Run<T>;
}

export type Infer<C> = C extends Check<infer T> ? T : never;

export function check<T>(run: Run<T>): Check<T> {
  return {
    run,
    safeParse(input) {
      try {
        return { success: true, data: run(input) };
      } catch (err) {
        if (err === FAIL) return { success: false };
        throw err;
      }
    },
  };
}

function need(ok: boolean): void {
  if (!ok) throw FAIL;
}

export const string = (minLength = 0) =>
  check((v) => {
    need(typeof v === 'string' && v.length >= minLength);
    return v as string;
  });

/** Finite numbers only, like zod 4's z.number(). */
export const number = check((v) => {
  need(typeof v === 'number' && Number.isFinite(v));
  return v as number;
});

export const boolean = check((v) => {
  need(typeof v === 'boolean');
  return v as boolean;
});

export const oneOf = <const V extends readonly string[]>(values: V) =>
  check((v) => {
    need(values.includes(v as string));
    return v as V[number];
  });

export const nullable = <T>(c: Check<T>) => check((v) => (v === null ? null : c.run(v)));

export const array = <T>(c: Check<T>, minLength = 0) =>
  check((v) => {
    need(Array.isArray(v) && v.length >= minLength);
    return (v as unknown[]).map(c.run);
  });

export function object<S extends Record<string, Check<unknown>>>(shape: S): Check<{ [K in keyof S]: Infer<S[K]> }> {
  return check((v) => {
    need(typeof v === 'object' && v !== null && !Array.isArray(v));
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(shape)) {
      const value = shape[key]!.run((v as Record<string, unknown>)[key]);
      if (value !== undefined) out[key] = value; // an optional key left out stays out
    }
    return out as { [K in keyof S]: Infer<S[K]> };
  });
}

export const optional = <T>(c: Check<T>) => check((v) => (v === undefined ? undefined : c.run(v)));

/** An object used as a map (zod's record with string keys). */
export const record = <T>(c: Check<T>) =>
  check((v) => {
    need(typeof v === 'object' && v !== null && !Array.isArray(v));
    return Object.fromEntries(Object.entries(v as object).map(([k, x]) => [k, c.run(x)])) as Record<string, T>;
  });

/** A custom rule on top of a check (zod's refine). */
export const refine = <T>(c: Check<T>, ok: (value: T) => boolean) =>
  check((v) => {
    const value = c.run(v);
    need(ok(value));
    return value;
  });
