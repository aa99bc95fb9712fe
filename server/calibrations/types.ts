import type { Fit, ModelKind } from '../../shared/calc';

/** Calibrations as stored and read: statuses, units, datasets, versions and crop assignments. */
export const CALIBRATION_STATUSES = ['draft', 'published', 'retired'] as const;
export type CalibrationStatus = (typeof CALIBRATION_STATUSES)[number];
export const LENGTH_UNITS = ['cm', 'in'] as const;
export type LengthUnit = (typeof LENGTH_UNITS)[number];
export const BIOMASS_UNITS = ['kg_ha', 'lb_ac', 'g_m2'] as const;
export type BiomassUnit = (typeof BIOMASS_UNITS)[number];

/** One paired point in storage units: x mean main shoot length (cm), y oven-dry shoot biomass (kg/ha). */
export interface DatasetPoint {
  x: number;
  y: number;
  site?: string;
  date?: string;
  stage?: string;
  note?: string;
  /** Line of the uploaded file it came from. */
  line?: number;
}

export interface Dataset {
  id: string;
  name: string;
  fileName: string | null;
  lengthUnit: LengthUnit;
  biomassUnit: BiomassUnit;
  rowCount: number;
  points: DatasetPoint[];
  uploadedByName: string | null;
  createdAt: string;
}

export interface Calibration {
  id: string;
  datasetId: string;
  datasetName: string;
  crop: string;
  cropLabel: string;
  variety: string | null;
  region: string | null;
  status: CalibrationStatus;
  version: number | null;
  label: string | null;
  model: ModelKind | null;
  fit: Fit | null;
  n: number;
  rSquared: number | null;
  residualStdError: number | null;
  looRmse: number | null;
  xRange: [number, number];
  createdByName: string | null;
  createdAt: string;
  updatedAt: string;
  publishedByName: string | null;
  publishedAt: string | null;
  retiredByName: string | null;
  retiredAt: string | null;
  /** Some assignment (crop-wide or for a variety) points at it. */
  assigned: boolean;
}

export interface Assignment {
  crop: string;
  cropLabel: string;
  /** null: every variety of the crop. */
  variety: string | null;
  calibrationId: string;
  version: number | null;
  label: string | null;
  calibrationVariety: string | null;
  calibrationRegion: string | null;
  assignedByName: string | null;
  assignedAt: string;
}
