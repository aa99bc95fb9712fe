import { describe, expect, it } from 'vitest';
import { sessionResponseSchema, sessionUserSchema } from '../../shared/schemas/session';

const user = {
  id: '7',
  name: 'Tomás Ibarra',
  email: 'tomas@example.test',
  role: 'sampler',
  organisation: { id: '1', name: 'Bajío Cover Crops' },
  units: 'metric',
  language: 'es',
};

describe('sessionUserSchema', () => {
  it('accepts the user of GET /api/session', () => {
    expect(sessionUserSchema.parse(user)).toEqual(user);
  });

  it.each(['admin', 'clerk', 'sampler', 'auditor'])('accepts role %s', (role) => {
    expect(sessionUserSchema.safeParse({ ...user, role }).success).toBe(true);
  });

  it.each([
    ['an unknown role', { role: 'owner' }],
    ['unknown units', { units: 'imperial' }],
    ['an unknown language', { language: 'fr' }],
    ['a missing language', { language: undefined }],
    ['a numeric id', { id: 7 }],
    ['an empty id', { id: '' }],
    ['no organisation', { organisation: undefined }],
    ['an organisation without id', { organisation: { name: 'x' } }],
  ])('rejects %s', (_label, patch) => {
    expect(sessionUserSchema.safeParse({ ...user, ...patch }).success).toBe(false);
  });

  it('drops keys it does not know (no password hash can leak through the type)', () => {
    const parsed = sessionUserSchema.parse({ ...user, passwordHash: 'x' });
    expect(parsed).not.toHaveProperty('passwordHash');
  });
});

describe('sessionResponseSchema', () => {
  it('accepts {user, csrfToken}', () => {
    expect(sessionResponseSchema.parse({ user, csrfToken: 'abc' }).csrfToken).toBe('abc');
  });

  it('rejects a missing or empty token', () => {
    expect(sessionResponseSchema.safeParse({ user }).success).toBe(false);
    expect(sessionResponseSchema.safeParse({ user, csrfToken: '' }).success).toBe(false);
  });

  it('rejects the signed-out 401 body', () => {
    const body = { error: { code: 'unauthenticated', message: 'Sign in.' }, csrfToken: 'abc' };
    expect(sessionResponseSchema.safeParse(body).success).toBe(false);
  });
});
