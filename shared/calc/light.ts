/*
 * The phone's subset of the estimation core: everything needed to estimate from a stored Fit,
 * with no matrix library (fitting lives in fit.ts / compare.ts, which import ml-matrix). Import from
 * here in client code that must stay small; the server can import from './index'.
 */
export * from './errors';
export * from './units';
export * from './t-dist';
export * from './sample';
export * from './fit-types';
export * from './predict';
export * from './inverse';
export * from './estimate';
export * from './combined';
export * from './power';
export * from './verdict';
export * from './outliers';
export * from './nitrogen';
export * from './lookup';
export * from './dates';
export * from './rules';
export * from './eligibility';
export * from './walk-plan';
