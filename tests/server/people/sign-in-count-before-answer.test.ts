import express from 'express';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { accessLimits, MemoryAttemptStore, type AttemptStore } from '../../../server/people/sign-in-limits';

/**
 * A store that takes 30 ms to write, as a database round trip can: a client that signs in again
 * the moment it is told "wrong password" must still find that failure counted.
 */
class SlowStore implements AttemptStore {
  private readonly inner = new MemoryAttemptStore();
  async hit(key: string, windowMs: number) {
    await new Promise((r) => setTimeout(r, 30));
    return this.inner.hit(key, windowMs);
  }
  count(key: string) {
    return this.inner.count(key);
  }
  async reset(key: string) {
    await new Promise((r) => setTimeout(r, 30));
    return this.inner.reset(key);
  }
}

const SETTINGS = { perPair: 5, perAddress: 50, perAccount: 20, slowdownMs: 0, forgotPerAddress: 5, forgotPerAccount: 3, uploadsPerHour: 600 };

describe('sign-in failures are counted before the answer goes out', () => {
  it('the sixth try right after five wrong passwords is refused, with a store that writes slowly', async () => {
    const limits = accessLimits(SETTINGS, new SlowStore());
    const app = express();
    app.use(express.json());
    app.post('/signin', limits.signIn, (req, res) => {
      res.status(req.body.password === 'right' ? 200 : 401).json({});
    });
    for (let i = 0; i < 5; i++) expect((await request(app).post('/signin').send({ email: 'a@example.test', password: 'wrong' })).status).toBe(401);
    expect((await request(app).post('/signin').send({ email: 'a@example.test', password: 'right' })).status).toBe(429);
  });
});
