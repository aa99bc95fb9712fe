import { CROPS } from '../../shared/calc/rules';
import { cropName } from '../../shared/registry/crops';
import type { Formatter } from '../platform/format';
import { expectDefined } from '../platform/expect-defined';

/*
 * The change history as a person reads it: the stored snapshots keep the records' own keys, SI
 * numbers and crop codes (what the API returns); the page names each value in words, in the
 * reader's units, with crop names.
 */

/** Each stored key as the forms name it. */
export const HISTORY_FIELD_LABELS: Record<string, string> = {
  name: 'Name',
  code: 'Code',
  county: 'County',
  notes: 'Notes',
  contactEmails: 'Grower e-mails',
  ranchId: 'Ranch',
  areaHa: 'Area',
  boundary: 'Boundary',
  fieldId: 'Field',
  season: 'Season',
  crop: 'Crop',
  variety: 'Variety',
  seededOn: 'Seeded',
  seedingRateKgHa: 'Seeding rate',
  plannedTerminationOn: 'Planned termination',
  terminatedOn: 'Terminated',
};

export const HISTORY_ACTION_WORDS: Record<string, string> = { create: 'Added', update: 'Changed', delete: 'Deleted', import: 'Imported' };

/** One stored value in words. */
export function historyValue(key: string, value: unknown, fmt: Formatter): string {
  if (value == null || value === '') return '—';
  switch (key) {
    case 'areaHa':
      return typeof value === 'number' ? fmt.area(value, 2) : String(value);
    case 'seedingRateKgHa':
      return typeof value === 'number' ? fmt.rate(value) : String(value);
    case 'crop':
      return cropName(String(value));
    case 'seededOn':
    case 'plannedTerminationOn':
    case 'terminatedOn':
      return fmt.date(String(value));
    case 'season':
      return String(value).replace('-', '–');
    case 'boundary':
      return 'drawn';
    case 'ranchId':
    case 'fieldId':
      return 'another record';
    case 'contactEmails':
      return Array.isArray(value) ? value.join(', ') || '—' : String(value);
    default:
      return typeof value === 'object' ? 'set' : String(value);
  }
}

const CODE_IN_PARENTHESES = new RegExp(`\\((${CROPS.join('|')})\\)`, 'g');
const KEY_LIST = new RegExp(`: ((?:${Object.keys(HISTORY_FIELD_LABELS).join('|')})(?:, (?:${Object.keys(HISTORY_FIELD_LABELS).join('|')}))*) changed$`);

/**
 * A stored summary in words: entries written before summaries named crops and values in words
 * ("Planting 2026-27 (cereal_rye) created", "Field “North”: areaHa, boundary changed") read as
 * "Planting 2026-27 (Cereal rye) created" and "Field “North”: area, boundary changed".
 */
export function historySummary(summary: string): string {
  return summary
    .replace(CODE_IN_PARENTHESES, (_m, code: string) => `(${cropName(code)})`)
    // KEY_LIST matches only keys that have a label.
    .replace(KEY_LIST, (_m, keys: string) => `: ${keys.split(', ').map((k) => expectDefined(HISTORY_FIELD_LABELS[k], `the label of ${k}`).toLowerCase()).join(', ')} changed`);
}
