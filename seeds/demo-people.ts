/**
 * The invented demo scenario's organisations and people. Every name, place and address here is
 * made up for the demo; the `.test` domains are reserved and can never reach a real mailbox.
 */
export const DEMO_ORGANISATIONS = [
  { id: '0b7d3f7e-0000-4000-8000-000000000001', name: 'Bramblecrest Growers (demo)' },
  { id: '0b7d3f7e-0000-4000-8000-000000000002', name: 'Quillwater Vegetable Co. (demo)' },
] as const;

/** The id of the demo organisation at `index` in DEMO_ORGANISATIONS. */
export function demoOrganisationId(index: number): string {
  const organisation = DEMO_ORGANISATIONS[index];
  if (!organisation) throw new Error(`the demo has no organisation number ${index}`);
  return organisation.id;
}

export const DEMO_USERS = [
  { id: '0b7d3f7e-0000-4000-8000-000000000101', org: 0, name: 'Noor Halvane', email: 'admin@crowntip.test', role: 'admin' },
  { id: '0b7d3f7e-0000-4000-8000-000000000102', org: 0, name: 'Jonah Pellbrook', email: 'clerk@crowntip.test', role: 'clerk' },
  { id: '0b7d3f7e-0000-4000-8000-000000000103', org: 0, name: 'Rosalía Quintanar', email: 'sampler@crowntip.test', role: 'sampler', language: 'es' },
  { id: '0b7d3f7e-0000-4000-8000-000000000104', org: 0, name: 'Wendell Oskarby', email: 'auditor@crowntip.test', role: 'auditor' },
  { id: '0b7d3f7e-0000-4000-8000-000000000105', org: 0, name: 'Teo Marquenda', email: 'sampler2@crowntip.test', role: 'sampler' },
  { id: '0b7d3f7e-0000-4000-8000-000000000201', org: 1, name: 'Priya Castelmoor', email: 'admin@quillwater.test', role: 'admin' },
  { id: '0b7d3f7e-0000-4000-8000-000000000202', org: 1, name: 'Dario Fenwhistle', email: 'clerk@quillwater.test', role: 'clerk' },
  { id: '0b7d3f7e-0000-4000-8000-000000000203', org: 1, name: 'Ines Barrowmede', email: 'sampler@quillwater.test', role: 'sampler' },
  { id: '0b7d3f7e-0000-4000-8000-000000000204', org: 1, name: 'Hal Ostrander-Vey', email: 'auditor@quillwater.test', role: 'auditor' },
] as const;
