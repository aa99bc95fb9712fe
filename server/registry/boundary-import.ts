import type { Boundary } from '../../shared/registry/boundary';
import { fieldInputSchema } from '../../shared/schemas/registry';
import type { UploadedShape } from './boundary-files';

/**
 * Many fields from one boundary file: each shape is matched by a name attribute to a field of the
 * ranch (same name, ignoring case and surrounding spaces, as field names are unique) or becomes a
 * new field. All or nothing: one problem row stops the whole import, and each row says in plain
 * words what will happen or what is wrong.
 */
export interface ExistingField {
  id: string;
  name: string;
  hasBoundary: boolean;
}

export type PlanRow =
  | { index: number; name: string; areaHa: number; action: 'replace' | 'add'; fieldId: string; fieldName: string; boundary: Boundary; message: string }
  | { index: number; name: string; areaHa: number; action: 'create'; boundary: Boundary; message: string }
  | { index: number; name: string; areaHa: number | null; action: 'problem'; message: string };

export interface ImportPlan {
  nameKey: string;
  rows: PlanRow[];
  problems: number;
  counts: { replace: number; add: number; create: number };
}

/** A new field's entered area: the boundary's, to the hundredth of a hectare. */
export const newFieldAreaHa = (ha: number) => Math.round(ha * 100) / 100;
const key = (name: string) => name.trim().toLowerCase();

export function planBoundaryImport(shapes: UploadedShape[], nameKey: string, fields: ExistingField[], area: (ha: number) => string): ImportPlan {
  const byName = new Map(fields.map((f) => [key(f.name), f]));
  const seen = new Map<string, number>();
  for (const s of shapes) {
    const name = (s.properties[nameKey] ?? '').trim();
    if (name) seen.set(key(name), (seen.get(key(name)) ?? 0) + 1);
  }
  const rows = shapes.map((s): PlanRow => {
    const name = (s.properties[nameKey] ?? '').trim();
    const problem = (message: string): PlanRow => ({ index: s.index, name, areaHa: s.areaHa, action: 'problem', message });
    if (!name) return problem(`This shape has no “${nameKey}”: name it in the file, or choose another attribute for the names.`);
    const nameCheck = fieldInputSchema.shape.name.safeParse(name);
    if (!nameCheck.success) return problem(nameCheck.error.issues[0]?.message ?? 'This name cannot be used.');
    if ((seen.get(key(name)) ?? 0) > 1) return problem(`${seen.get(key(name))} shapes in the file are named “${name}”; a field takes one boundary.`);
    if (s.problem || !s.boundary || s.areaHa == null) return problem(s.problem ?? 'This shape is not a polygon.');
    const field = byName.get(key(name));
    if (field) {
      const action = field.hasBoundary ? 'replace' : 'add';
      const message = field.hasBoundary ? `Replaces the boundary of field “${field.name}”.` : `Adds a boundary to field “${field.name}”.`;
      return { index: s.index, name, areaHa: s.areaHa, action, fieldId: field.id, fieldName: field.name, boundary: s.boundary, message };
    }
    const areaCheck = fieldInputSchema.shape.areaHa.safeParse(newFieldAreaHa(s.areaHa));
    if (!areaCheck.success) return problem(`As a new field: ${areaCheck.error.issues[0]?.message ?? 'its area cannot be used.'}`);
    return { index: s.index, name, areaHa: s.areaHa, action: 'create', boundary: s.boundary, message: `New field “${name}”, area ${area(s.areaHa)} from the boundary.` };
  });
  const count = (a: PlanRow['action']) => rows.filter((r) => r.action === a).length;
  return { nameKey, rows, problems: count('problem'), counts: { replace: count('replace'), add: count('add'), create: count('create') } };
}
