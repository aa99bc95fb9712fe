/** The four roles and how the office names them; what each may do is server/platform/permissions.ts. */
export const ROLES = ['admin', 'clerk', 'sampler', 'auditor'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  clerk: 'Office clerk',
  sampler: 'Sampler',
  auditor: 'Auditor (read-only)',
};

export const ROLE_SUMMARIES: Record<Role, string> = {
  admin: 'users, roles, organisation settings, credit rules and calibrations',
  clerk: 'the farm registry, walk review and credit registers',
  sampler: 'field walks on a phone in /capture',
  auditor: 'reads registers, walks, calibrations and the change history; prints and exports',
};
