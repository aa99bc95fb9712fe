import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ACTIONS, allows, homeFor, permissionsTable, rolesAllowed } from '../../../server/platform/permissions';
import { ROLES } from '../../../server/platform/roles';

const README = fs.readFileSync('README.md', 'utf8');

describe('the permissions map', () => {
  it('is the role matrix printed in the README', () => {
    const printed = README.match(/<!-- role-matrix:start -->\n([\s\S]*?)\n<!-- role-matrix:end -->/);
    expect(printed, 'README has no role-matrix block').not.toBeNull();
    // On a difference, copy this table into README.md between the role-matrix markers.
    expect(printed![1]).toBe(permissionsTable());
  });

  // The product's roles as README "Who does what" describes them in words (not read from the map).
  it('gives the auditor reading only, and no change of any kind', () => {
    const changes = ACTIONS.filter((a) => /\.(write|create|review|assign|manage|fit|publish|finalise|outbox)$/.test(a));
    expect(changes.length).toBeGreaterThan(8);
    for (const action of changes) expect(allows('auditor', action), action).toBe(false);
    for (const action of ['registry.read', 'history.read', 'walks.readAll', 'registers.read', 'calibrations.read'] as const) {
      expect(allows('auditor', action), action).toBe(true);
    }
  });

  it('keeps users, the outbox, the credit rule and publishing calibrations to the admin', () => {
    for (const action of ['users.manage', 'mail.outbox', 'rules.manage', 'calibrations.publish'] as const) {
      expect(rolesAllowed(action), action).toEqual(['admin']);
    }
  });

  it('lets clerks and admins run the registry, walk review and registers; samplers walk', () => {
    for (const action of ['registry.write', 'walks.review', 'walks.assign', 'registers.finalise'] as const) {
      expect(rolesAllowed(action), action).toEqual(['admin', 'clerk']);
    }
    expect(rolesAllowed('walks.create')).toEqual(['admin', 'clerk', 'sampler']);
    expect(rolesAllowed('walks.assignee')).toEqual(['sampler']);
  });

  it('sends samplers to the capture app and everyone else to the office', () => {
    expect(ROLES.map((r) => [r, homeFor(r)])).toEqual([
      ['admin', '/office'],
      ['clerk', '/office'],
      ['sampler', '/capture'],
      ['auditor', '/office'],
    ]);
  });

  it('is the only server file that names a role', () => {
    const files: string[] = [];
    const walk = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (p.endsWith('.ts')) files.push(p);
      }
    };
    walk('server');
    const allowed = new Set([path.join('server', 'platform', 'permissions.ts'), path.join('server', 'platform', 'roles.ts')]);
    const offenders = files
      .filter((f) => !allowed.has(f))
      .flatMap((f) =>
        fs
          .readFileSync(f, 'utf8')
          .split('\n')
          .flatMap((line, i) => (/['"`](admin|clerk|sampler|auditor)['"`]/.test(line) ? [`${f}:${i + 1}: ${line.trim()}`] : [])),
      );
    expect(offenders).toEqual([]);
  });
});
