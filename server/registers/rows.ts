import { CalcError } from '../../shared/calc/errors';
import { creditEligibility } from '../../shared/calc/eligibility';
import { daysBetween } from '../../shared/calc/dates';
import { shootNitrogen } from '../../shared/calc/nitrogen';
import type { DecisionBasis } from '../../shared/calc/rules';
import type { MorePlantsAdvice, Verdict as WalkVerdictWord, VerdictReason } from '../../shared/calc/verdict';
import { walkVerdictOf, type StoredEstimate } from '../../shared/format/walk';
import { seasonStarting } from '../../shared/registry/season';
import { CROP_LABELS } from '../../shared/registry/crops';
import type { ApprovedWalkInput, FieldWithPlanting, RegisterRanchInput } from './inputs-db';
import type { RuleInUse } from '../rules/public';

/*
 * A register's rows, totals and verdicts, computed from the registry, the approved walks and the
 * rule in use (pure: no database). The service (service.ts) reads the inputs and finalises.
 */

export const MIN_YEAR = 2000;
export const MAX_YEAR = 2100;

/** The season a reporting year covers: 2027 → "2026-27". */
export const seasonOfYear = (year: number) => seasonStarting(year - 1);

/** The reporting year whose season contains the date: the winter in progress ends in it. */
export const reportingYearOf = (isoDate: string) => {
  const y = Number(isoDate.slice(0, 4));
  return Number(isoDate.slice(5, 7)) >= 7 ? y + 1 : y;
};

export type Verdict = 'eligible' | 'not_eligible' | 'projected_eligible' | 'no_planting';

export interface RegisterReason {
  code: string;
  /** English, SI: kept for old readers; pages, files and e-mails word the reason afresh from `data`. */
  message: string;
  /** The numbers and dates behind the reason (absent in versions finalised before it existed). */
  data?: Record<string, unknown>;
}

export interface RegisterWalk {
  id: string;
  walkedOn: string;
  n: number;
  meanLengthCm: number;
  biomassKgHa: number;
  interval: [number, number];
  level: number;
  calibrationId: string;
  calibrationVersion: number | string;
  extrapolated: boolean;
  /*
   * The fields below are absent in versions finalised before they existed; readers fall back to
   * the point estimate against the register's threshold (server/registers/format.ts).
   */
  /** The walk's own verdict, read from its stored snapshot. */
  verdict?: WalkVerdictWord;
  decisionBasis?: DecisionBasis;
  /** The credit rule version the walk was judged by; null for snapshots stored before it was recorded. */
  ruleVersionId?: string | null;
  combinedInterval?: [number, number] | null;
  /** The threshold the walk was judged against (kg/ha), so its biomass prints the same everywhere. */
  thresholdKgHa?: number;
  /** The lab's tissue N % and the N held in the shoots (kg N/ha): information, never part of the verdict. */
  tissueNPercent?: number | null;
  shootN?: { kgNPerHa: number; interval: [number, number] | null } | null;
  /** Only when an admin let the walker review this walk themselves: who waived the rule and why. */
  ownReviewWaiver?: { byName: string; reason: string };
}

/** A field and its planting as the register reads them (the ranch is the register's own). */
export interface RegisterRow extends Omit<FieldWithPlanting, 'ranchId' | 'ranchName'> {
  /** True when the planting has no termination date: counted up to the projection date. */
  projected: boolean;
  /** The day growth was counted up to (termination, or the projection date). */
  endOn: string | null;
  daysInWindow: number | null;
  /** The approved walk the verdict rests on, or the latest approved one when none qualifies. */
  walk: RegisterWalk | null;
  /** True when `walk` is the latest approved walk before the end within the rule's gap. */
  walkQualifies: boolean;
  verdict: Verdict;
  eligible: boolean;
  /** kg N: credit per hectare × area when eligible (projected rows carry what they would earn). */
  creditKgN: number;
  reasons: RegisterReason[];
}

export interface RegisterTotals {
  fields: number;
  plantedFields: number;
  eligibleFields: number;
  totalAreaHa: number;
  eligibleAreaHa: number;
  /** kg N of the eligible (terminated) rows only. */
  creditKgN: number;
  projectedFields: number;
  /** kg N the projected rows would earn if terminated on the projection date; not in creditKgN. */
  projectedCreditKgN: number;
}

export interface RegisterRule {
  id: string | null;
  version: number | null;
  label: string;
  effectiveFrom: string | null;
  isDemo: boolean;
  thresholdKgHa: number;
  minDaysInWindow: number;
  window: { start: string; end: string };
  eligibleCrops: string[];
  creditKgNPerHa: number;
  maxDaysSampleBeforeTermination: number;
}

export interface Register {
  organisationId: string;
  ranch: { id: string; name: string; code: string | null; county: string | null };
  year: number;
  season: string;
  /** The day the register was computed. */
  computedOn: string;
  /** Plantings without a termination date are counted up to this day: min(computedOn, 31 Dec of the year). */
  projectionDate: string;
  rule: RegisterRule;
  rows: RegisterRow[];
  totals: RegisterTotals;
  calibrations: { id: string; version: number | string }[];
  walkIds: string[];
  /** The moment whose registry the rows read (server/registers/registry-as-of.ts); absent on versions finalised before it was kept. */
  registryAsOf?: string;
}

/** What a finalised version stores and hashes: the register plus its version and who finalised it when. */
export interface FinalSnapshot extends Register {
  version: number;
  previousId: string | null;
  finalisedBy: { id: string | null; name: string };
  finalisedAt: string;
}

export interface FinalRegister extends FinalSnapshot {
  id: string;
  contentHash: string;
}

export const ruleOfRegister = (r: RuleInUse): RegisterRule => ({
  id: r.id,
  version: r.version,
  label: r.label,
  effectiveFrom: r.effectiveFrom,
  isDemo: r.isDemo,
  thresholdKgHa: r.thresholdKgHa,
  minDaysInWindow: r.minDaysInWindow,
  window: { start: r.window.start, end: r.window.end },
  eligibleCrops: [...r.eligibleCrops],
  creditKgNPerHa: r.creditKgNPerHa,
  maxDaysSampleBeforeTermination: r.maxDaysSampleBeforeTermination,
});

export const projectionDateOf = (year: number, today: string) => (today < `${year}-12-31` ? today : `${year}-12-31`);

const toRegisterWalk = (w: ApprovedWalkInput): RegisterWalk => {
  const e = w.estimate!;
  const v = walkVerdictOf(e as StoredEstimate);
  let shootN: RegisterWalk['shootN'] = null;
  if (w.tissueNPercent != null) {
    try {
      // The interval carried is the verdict's combined one when stored, else the snapshot's interval.
      const n = shootNitrogen(e.biomassKgHa, w.tissueNPercent, v.combinedInterval ?? [e.interval[0], e.interval[1]]);
      shootN = { kgNPerHa: n.kgNPerHa, interval: n.interval };
    } catch (err) {
      if (!(err instanceof CalcError)) throw err;
    }
  }
  return {
    id: w.id,
    walkedOn: w.walkedOn,
    n: e.n,
    meanLengthCm: e.meanLengthCm,
    biomassKgHa: e.biomassKgHa,
    interval: [e.interval[0], e.interval[1]],
    level: e.level,
    calibrationId: e.calibrationId,
    calibrationVersion: e.calibrationVersion,
    extrapolated: e.extrapolated,
    verdict: v.verdict,
    decisionBasis: v.decisionBasis,
    ruleVersionId: v.ruleVersionId,
    combinedInterval: v.combinedInterval,
    thresholdKgHa: e.thresholdKgHa,
    tissueNPercent: w.tissueNPercent,
    shootN,
    ...(w.ownReviewWaiver ? { ownReviewWaiver: { ...w.ownReviewWaiver } } : {}),
  };
};

/** The walk's verdict as a register reason when it keeps a qualifying walk from earning the credit. */
function walkVerdictReason(w: ApprovedWalkInput): RegisterReason | null {
  const v = walkVerdictOf(w.estimate as StoredEstimate);
  if (v.verdict === 'meets') return null;
  const data: { walkedOn: string; verdict: WalkVerdictWord; reasons: VerdictReason[]; morePlants: MorePlantsAdvice | null } = {
    walkedOn: w.walkedOn,
    verdict: v.verdict,
    reasons: v.reasons,
    morePlants: v.morePlants,
  };
  return v.verdict === 'borderline'
    ? { code: 'walk_borderline', message: `The approved walk of ${w.walkedOn} is borderline: it does not earn the credit until it is settled.`, data }
    : { code: 'walk_below', message: `The approved walk of ${w.walkedOn} is below under the rule's decision basis.`, data };
}

/**
 * The walk a planting's verdict rests on: the latest approved walk on or before the end (termination
 * or projection date) and no more than the rule's gap before it. When none qualifies but approved
 * walks exist, the latest of them, so that the core names why (too early, or after termination).
 */
export function chooseWalk(walks: ApprovedWalkInput[], seededOn: string, endOn: string, maxGapDays: number): { walk: ApprovedWalkInput | null; qualifies: boolean } {
  // Walks without an estimate (no calibration assigned) or dated before seeding cannot be judged.
  const usable = walks.filter((w) => w.estimate && w.walkedOn >= seededOn);
  if (!usable.length) return { walk: null, qualifies: false };
  const qualifying = usable.filter((w) => w.walkedOn <= endOn && daysBetween(w.walkedOn, endOn) <= maxGapDays);
  // Both lists keep the query's order (walk date, then review time), so the last is the latest.
  const latest = qualifying[qualifying.length - 1];
  if (latest) return { walk: latest, qualifies: true };
  return { walk: usable[usable.length - 1] ?? null, qualifies: false };
}

const SHORT_MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * Why a planting has no estimate, when an approved walk exists but carries none (no calibration was
 * assigned for its crop): "a field walk is needed" would be untrue there.
 */
function noEstimateMessage(walks: ApprovedWalkInput[], seededOn: string, crop: string): string | null {
  const bare = walks.filter((w) => !w.estimate && w.walkedOn >= seededOn);
  if (!bare.length) return null;
  const [, m = 0, d] = bare[bare.length - 1]!.walkedOn.split('-').map(Number);
  return `The approved walk of ${d} ${SHORT_MONTHS[m - 1]} has no estimate: no calibration is assigned for ${((CROP_LABELS as Record<string, string>)[crop] ?? crop).toLowerCase()}.`;
}

/** One field's row: its planting (if any) judged by the core's creditEligibility under the rule. */
export function registerRow(field: FieldWithPlanting, walks: ApprovedWalkInput[], rule: RegisterRule, projectionDate: string, season: string): RegisterRow {
  const base = {
    fieldId: field.fieldId,
    fieldName: field.fieldName,
    areaHa: field.areaHa,
    plantingId: field.plantingId,
    crop: field.crop,
    variety: field.variety,
    seededOn: field.seededOn,
    terminatedOn: field.terminatedOn,
    plannedTerminationOn: field.plannedTerminationOn,
  };
  if (!field.plantingId || !field.seededOn || !field.crop) {
    return {
      ...base,
      projected: false,
      endOn: null,
      daysInWindow: null,
      walk: null,
      walkQualifies: false,
      verdict: 'no_planting',
      eligible: false,
      creditKgN: 0,
      reasons: [{ code: 'no_planting', message: `No cover crop is recorded on this field for season ${season}.` }],
    };
  }
  // A planting seeded after the projection date has grown nothing yet: project to its seeding day.
  const today = projectionDate < field.seededOn ? field.seededOn : projectionDate;
  const endOn = field.terminatedOn ?? today;
  const { walk, qualifies } = chooseWalk(walks, field.seededOn, endOn, rule.maxDaysSampleBeforeTermination);
  try {
    const result = creditEligibility(
      { crop: field.crop, seededOn: field.seededOn, terminatedOn: field.terminatedOn, areaHa: field.areaHa },
      walk ? { biomassKgHa: walk.estimate!.biomassKgHa, walkedOn: walk.walkedOn } : null,
      { ...rule, today },
    );
    const reasons: RegisterReason[] = result.reasons.map((r) => ({
      code: r.code,
      message: r.code === 'no_estimate' ? noEstimateMessage(walks, field.seededOn!, field.crop!) ?? r.message : r.message,
      ...(r.data ? { data: { ...r.data } } : {}),
    }));
    // A borderline walk (or one below under a lower-bound rule) does not earn the credit, whatever
    // its point estimate says; when the estimate is already below the threshold that reason says it.
    const walkReason = walk && qualifies && !reasons.some((r) => r.code === 'below_threshold') ? walkVerdictReason(walk) : null;
    if (walkReason) reasons.push(walkReason);
    const eligible = result.eligible && !walkReason;
    return {
      ...base,
      projected: result.projected,
      endOn: result.endOn,
      daysInWindow: result.daysInWindow,
      walk: walk ? toRegisterWalk(walk) : null,
      walkQualifies: qualifies,
      verdict: eligible ? (result.projected ? 'projected_eligible' : 'eligible') : 'not_eligible',
      eligible,
      creditKgN: eligible ? result.creditKgN : 0,
      reasons,
    };
  } catch (err) {
    // Stored data the core refuses (e.g. termination before seeding): the row says so, the register still builds.
    if (!(err instanceof CalcError)) throw err;
    return {
      ...base,
      projected: !field.terminatedOn,
      endOn,
      daysInWindow: null,
      walk: walk ? toRegisterWalk(walk) : null,
      walkQualifies: false,
      verdict: 'not_eligible',
      eligible: false,
      creditKgN: 0,
      reasons: [{ code: 'invalid_dates', message: err.message }],
    };
  }
}

export function summarise(rows: RegisterRow[]): RegisterTotals {
  const t: RegisterTotals = { fields: 0, plantedFields: 0, eligibleFields: 0, totalAreaHa: 0, eligibleAreaHa: 0, creditKgN: 0, projectedFields: 0, projectedCreditKgN: 0 };
  for (const r of rows) {
    t.fields += 1;
    t.totalAreaHa += r.areaHa;
    if (r.plantingId) t.plantedFields += 1;
    if (r.projected) t.projectedFields += 1;
    if (r.verdict === 'eligible') {
      t.eligibleFields += 1;
      t.eligibleAreaHa += r.areaHa;
      t.creditKgN += r.creditKgN;
    } else if (r.verdict === 'projected_eligible') {
      t.projectedCreditKgN += r.creditKgN;
    }
  }
  return t;
}

export function assembleRegister(
  organisationId: string,
  ranch: RegisterRanchInput,
  year: number,
  rule: RegisterRule,
  today: string,
  rows: RegisterRow[],
): Register {
  const calibrations = new Map<string, { id: string; version: number | string }>();
  const walkIds = new Set<string>();
  for (const r of rows) {
    if (!r.walk) continue;
    walkIds.add(r.walk.id);
    calibrations.set(`${r.walk.calibrationId}\u0000${r.walk.calibrationVersion}`, { id: r.walk.calibrationId, version: r.walk.calibrationVersion });
  }
  return {
    organisationId,
    ranch: { id: ranch.id, name: ranch.name, code: ranch.code, county: ranch.county },
    year,
    season: seasonOfYear(year),
    computedOn: today,
    projectionDate: projectionDateOf(year, today),
    rule,
    rows,
    totals: summarise(rows),
    calibrations: [...calibrations.values()].sort((a, b) => a.id.localeCompare(b.id) || String(a.version).localeCompare(String(b.version), 'en', { numeric: true })),
    walkIds: [...walkIds].sort(),
  };
}

/** Groups walks by planting, keeping their order. */
export function walksByPlanting(walks: ApprovedWalkInput[]): Map<string, ApprovedWalkInput[]> {
  const out = new Map<string, ApprovedWalkInput[]>();
  for (const w of walks) {
    const list = out.get(w.plantingId);
    if (list) list.push(w);
    else out.set(w.plantingId, [w]);
  }
  return out;
}

