import { COLUMN_KEYS } from './columns';

// 8. Template and example -----------------------------------------------------------------------

/** Header names of the template: Crowntip's columns, with the unit in the two that have one. */
export function templateHeader(units: 'us' | 'metric'): string[] {
  return COLUMN_KEYS.map((k) => {
    if (k === 'area') return units === 'metric' ? 'area_ha' : 'area_ac';
    if (k === 'seeding_rate') return units === 'metric' ? 'seeding_rate_kg_ha' : 'seeding_rate_lb_ac';
    return k;
  });
}

export function templateRows(units: 'us' | 'metric'): string[][] {
  return units === 'metric'
    ? [['Sandpiper Bench', 'North 40 Flats', '16.2', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-14', '100', '2027-03-10', '', '']]
    : [['Sandpiper Bench', 'North 40 Flats', '40', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-14', '90', '2027-03-10', '', '']];
}

/** The invented demo scenario's plantings for the coming winter (US units): names and places are made up. */
export const EXAMPLE_HEADER = templateHeader('us');
export const EXAMPLE_ROWS: string[][] = [
  ['Sandpiper Bench', 'North 40 Flats', '40', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-14', '90', '2027-03-10', '', 'Drilled after the fall lettuce'],
  ['Sandpiper Bench', 'Pump House 3', '22.5', '2026-27', 'Triticale', 'Tallstem 4', '2026-10-15', '110', '2027-03-12', '', ''],
  ['Sandpiper Bench', 'Levee Strip', '8.75', '2026-27', 'Barley', 'Frostline', '2026-10-15', '100', '2027-02-26', '', 'Narrow; walk lengthwise'],
  ['Sandpiper Bench', 'Cottonwood East', '31', '2026-27', 'Oats', 'Quickhusk', '2026-10-20', '100', '2027-03-05', '', ''],
  ['Sandpiper Bench', 'Cottonwood West', '29.4', '2026-27', 'Cereal rye', 'Greyleaf 2', '2026-10-21', '90', '2027-03-05', '', ''],
  ['Sandpiper Bench', 'Old Orchard Block', '12', '2026-27', 'Mix', '', '2026-10-22', '80', '2027-03-20', '', 'Rye and vetch, 70:30 by weight'],
  ['Sandpiper Bench', 'South Terrace', '18.2', '2026-27', 'Wheat', 'Ambergrain', '2026-10-28', '120', '2027-03-15', '', ''],
  ['Kestrel Mesa', 'Mesa Top 1', '55', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-30', '90', '2027-03-18', '', ''],
  ['Kestrel Mesa', 'Mesa Top 2', '48.6', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-30', '90', '2027-03-18', '', ''],
  ['Kestrel Mesa', 'Windbreak Field', '14.3', '2026-27', 'Triticale', 'Tallstem 4', '2026-11-02', '110', '2027-03-20', '', ''],
  ['Kestrel Mesa', 'Sump Corner', '6.5', '2026-27', 'Barley', 'Frostline', '2026-11-03', '100', '2027-02-28', '', 'Wet in January most years'],
  ['Kestrel Mesa', 'Long Furrow', '37.25', '2026-27', 'Oats', 'Quickhusk', '2026-11-04', '100', '2027-03-10', '', ''],
  ['Kestrel Mesa', 'Gate 7', '20', '2026-27', 'Legume', 'Hoopvine vetch', '2026-11-05', '40', '2027-04-01', '', 'Not a cereal: shown for the record'],
  ['Willowdrift Ranch', 'Heron Slough', '26.8', '2026-27', 'Cereal rye', 'Greyleaf 2', '2026-11-06', '90', '2027-03-08', '', ''],
  ['Willowdrift Ranch', 'Willow Row', '17.5', '2026-27', 'Triticale', 'Tallstem 4', '2026-11-09', '110', '2027-03-12', '', ''],
  ['Willowdrift Ranch', 'Clay Bottom', '42', '2026-27', 'Barley', 'Frostline', '2026-11-10', '100', '2027-03-01', '', ''],
  ['Willowdrift Ranch', 'Packing Shed North', '9.6', '2026-27', 'Wheat', 'Ambergrain', '2026-11-12', '120', '2027-03-15', '', ''],
  ['Willowdrift Ranch', 'Packing Shed South', '11.1', '2026-27', 'Cereal rye', 'Greyleaf', '2026-11-12', '90', '2027-03-15', '', ''],
  ['Willowdrift Ranch', 'Creek Bend', '33.3', '2026-27', 'Oats', 'Quickhusk', '2026-11-16', '100', '2027-03-22', '', ''],
  ['Willowdrift Ranch', 'Far Pivot', '60', '2026-27', 'Cereal rye', 'Greyleaf 2', '2026-11-18', '90', '2027-03-25', '', 'Sampler: start at the pivot road'],
];
