import type { Register, RegisterRow, RegisterTotals, Verdict } from './service';

/** Amendments: what changed between two versions of a register, row by row and in the totals. */
export type DiffKind = 'text' | 'area' | 'date' | 'days' | 'rate' | 'mass' | 'verdict' | 'flag';

export interface ValueChange {
  key: string;
  label: string;
  kind: DiffKind;
  before: unknown;
  after: unknown;
}

export interface RegisterDiff {
  unchanged: boolean;
  rule: { before: { id: string | null; version: number | null; label: string }; after: { id: string | null; version: number | null; label: string } } | null;
  added: { fieldId: string; fieldName: string; verdict: Verdict; creditKgN: number }[];
  removed: { fieldId: string; fieldName: string; verdict: Verdict; creditKgN: number }[];
  changed: { fieldId: string; fieldName: string; changes: ValueChange[] }[];
  totals: ValueChange[];
}

const ROW_VALUES: { key: string; label: string; kind: DiffKind; get: (r: RegisterRow) => unknown }[] = [
  { key: 'fieldName', label: 'Field', kind: 'text', get: (r) => r.fieldName },
  { key: 'areaHa', label: 'Area', kind: 'area', get: (r) => r.areaHa },
  { key: 'crop', label: 'Crop', kind: 'text', get: (r) => r.crop },
  { key: 'variety', label: 'Variety', kind: 'text', get: (r) => r.variety },
  { key: 'seededOn', label: 'Seeded', kind: 'date', get: (r) => r.seededOn },
  { key: 'terminatedOn', label: 'Terminated', kind: 'date', get: (r) => r.terminatedOn },
  { key: 'projected', label: 'Projected', kind: 'flag', get: (r) => r.projected },
  { key: 'daysInWindow', label: 'Days in window', kind: 'days', get: (r) => r.daysInWindow },
  { key: 'walkId', label: 'Walk', kind: 'text', get: (r) => r.walk?.id ?? null },
  { key: 'biomassKgHa', label: 'Estimate', kind: 'rate', get: (r) => r.walk?.biomassKgHa ?? null },
  { key: 'verdict', label: 'Verdict', kind: 'verdict', get: (r) => r.verdict },
  { key: 'creditKgN', label: 'Credit', kind: 'mass', get: (r) => r.creditKgN },
  { key: 'reasons', label: 'Reasons', kind: 'text', get: (r) => r.reasons.map((x) => x.code).join(', ') || null },
];

const TOTAL_VALUES: { key: keyof RegisterTotals; label: string; kind: DiffKind }[] = [
  { key: 'fields', label: 'Fields', kind: 'days' },
  { key: 'eligibleFields', label: 'Eligible fields', kind: 'days' },
  { key: 'totalAreaHa', label: 'Total area', kind: 'area' },
  { key: 'eligibleAreaHa', label: 'Eligible area', kind: 'area' },
  { key: 'creditKgN', label: 'Credit', kind: 'mass' },
  { key: 'projectedFields', label: 'Projected fields', kind: 'days' },
  { key: 'projectedCreditKgN', label: 'Projected credit', kind: 'mass' },
];

// Floating sums can differ in the last bits when only the order changed; such noise is no change.
const same = (a: unknown, b: unknown) =>
  typeof a === 'number' && typeof b === 'number' ? Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b)) : a === b;

/** Per-field changes (added, removed, changed values), the rule version and the totals between two versions. */
export function diffRegisters(prev: Register, next: Register): RegisterDiff {
  const before = new Map(prev.rows.map((r) => [r.fieldId, r]));
  const after = new Map(next.rows.map((r) => [r.fieldId, r]));
  const brief = (r: RegisterRow) => ({ fieldId: r.fieldId, fieldName: r.fieldName, verdict: r.verdict, creditKgN: r.creditKgN });
  const added = next.rows.filter((r) => !before.has(r.fieldId)).map(brief);
  const removed = prev.rows.filter((r) => !after.has(r.fieldId)).map(brief);
  const changed: RegisterDiff['changed'] = [];
  for (const r of next.rows) {
    const p = before.get(r.fieldId);
    if (!p) continue;
    const changes = ROW_VALUES.filter((v) => !same(v.get(p), v.get(r))).map((v) => ({ key: v.key, label: v.label, kind: v.kind, before: v.get(p), after: v.get(r) }));
    if (changes.length) changed.push({ fieldId: r.fieldId, fieldName: r.fieldName, changes });
  }
  const totals = TOTAL_VALUES.filter((v) => !same(prev.totals[v.key], next.totals[v.key])).map((v) => ({
    key: v.key,
    label: v.label,
    kind: v.kind,
    before: prev.totals[v.key],
    after: next.totals[v.key],
  }));
  const ruleOf = (r: Register) => ({ id: r.rule.id, version: r.rule.version, label: r.rule.label });
  const rule = prev.rule.id !== next.rule.id || prev.rule.version !== next.rule.version ? { before: ruleOf(prev), after: ruleOf(next) } : null;
  return { unchanged: !added.length && !removed.length && !changed.length && !totals.length && !rule, rule, added, removed, changed, totals };
}
