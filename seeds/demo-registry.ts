/**
 * The invented demo farm registry: ranches, fields (some with boundaries) and plantings for the
 * current and the previous season. Every name is made up. Boundaries are simple quadrilaterals
 * drawn around invented points in the open Pacific, more than 1,000 km west of any coast
 * (about 36° N, 135° W), so that no demo field can be mistaken for a real farm.
 */
export interface DemoField {
  name: string;
  areaAc: number;
  /** Draw a boundary of about this area (a slightly skewed rectangle). */
  boundary?: { widthM: number; skew?: number };
  /** What grows this winter: a crop code, 'fallow' (no planting) — and last winter. */
  now: string;
  before: string;
  variety?: string;
  terminatedDaysAgo?: number;
}

export interface DemoRanch {
  name: string;
  code: string;
  county: string;
  contactEmails: string[];
  origin: [number, number]; // lon, lat of the ranch's first field corner (invented, open sea)
  fields: DemoField[];
}

const F = (name: string, areaAc: number, now: string, before: string, extra: Partial<DemoField> = {}): DemoField => ({ name, areaAc, now, before, ...extra });

export const DEMO_RANCHES: DemoRanch[][] = [
  [
    {
      name: 'Sandpiper Bench',
      code: 'SB',
      county: 'Alder County',
      contactEmails: ['grower@sandpiper-bench.test'],
      origin: [-134.912, 36.204],
      fields: [
        F('Bench 1', 18.2, 'cereal_rye', 'triticale', { boundary: { widthM: 240 }, variety: 'Demo Rye 12' }),
        F('Bench 2', 21.5, 'cereal_rye', 'cereal_rye', { boundary: { widthM: 260, skew: 0.15 }, variety: 'Demo Rye 12' }),
        F('Bench 3', 12.0, 'triticale', 'cereal_rye', { boundary: { widthM: 200 }, variety: 'Winter Triticale T-4' }),
        F('Bench 4', 9.6, 'mix', 'legume', { boundary: { widthM: 180 } }),
        F('Bench 5', 25.1, 'cereal_rye', 'cereal_rye', { boundary: { widthM: 300, skew: -0.1 } }),
        F('Creekside', 7.4, 'fallow', 'cereal_rye'),
        F('Lower Terrace', 15.8, 'triticale', 'triticale', { variety: 'Winter Triticale T-4' }),
        F('Upper Terrace', 14.1, 'cereal_rye', 'mix'),
        F('Windbreak Strip', 4.2, 'legume', 'legume'),
        F('Pump House', 10.3, 'cereal_rye', 'fallow', { variety: 'Demo Rye 7' }),
      ],
    },
    {
      name: 'North Forty Flats',
      code: 'NF',
      county: 'Alder County',
      contactEmails: ['office@northforty.test'],
      origin: [-134.874, 36.231],
      fields: [
        F('Flats A', 40.0, 'cereal_rye', 'cereal_rye', { boundary: { widthM: 400 }, variety: 'Demo Rye 12' }),
        F('Flats B', 38.5, 'triticale', 'cereal_rye', { boundary: { widthM: 390, skew: 0.08 } }),
        F('Flats C', 22.0, 'cereal_rye', 'triticale', { terminatedDaysAgo: 2 }),
        F('Flats D', 19.7, 'mix', 'mix'),
        F('Gravel Pit Corner', 6.1, 'fallow', 'fallow'),
        F('Flats E', 27.3, 'triticale', 'triticale', { variety: 'Winter Triticale T-9' }),
        F('Flats F', 31.0, 'cereal_rye', 'legume'),
        F('Flats G', 12.9, 'barley', 'cereal_rye'),
        F('Flats H', 16.4, 'oats', 'oats'),
        F('Flats J', 20.2, 'cereal_rye', 'cereal_rye', { boundary: { widthM: 290 } }),
      ],
    },
    {
      name: 'Cobble Springs',
      code: 'CS',
      county: 'Juniper County',
      contactEmails: [],
      origin: [-134.801, 36.158],
      fields: [
        F('Spring 1', 11.5, 'triticale', 'cereal_rye', { boundary: { widthM: 215 } }),
        F('Spring 2', 13.0, 'cereal_rye', 'triticale'),
        F('Spring 3', 8.8, 'legume', 'mix'),
        F('Spring 4', 17.6, 'cereal_rye', 'cereal_rye'),
        F('Spring 5', 9.9, 'fallow', 'cereal_rye'),
        F('Orchard Edge', 5.5, 'mix', 'legume'),
        F('Long Row', 23.4, 'triticale', 'triticale', { boundary: { widthM: 150, skew: 0.05 } }),
        F('Barn Field', 14.7, 'cereal_rye', 'fallow'),
        F('Spring 6', 12.2, 'wheat', 'wheat'),
        F('Spring 7', 10.6, 'cereal_rye', 'cereal_rye'),
      ],
    },
  ],
  [
    {
      name: 'Heron Slough',
      code: 'HS',
      county: 'Tamarack County',
      contactEmails: ['grower@heronslough.test'],
      origin: [-135.302, 36.512],
      fields: [
        F('Slough 1', 22.0, 'cereal_rye', 'cereal_rye', { boundary: { widthM: 300 } }),
        F('Slough 2', 18.0, 'triticale', 'cereal_rye'),
        F('Slough 3', 9.0, 'legume', 'legume'),
      ],
    },
  ],
];
