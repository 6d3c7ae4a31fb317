import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { openHarness, rowCount, SMALL_PICK_TABLE, type Harness } from './api-harness.js';

const TOKEN = 'office-token-0123456789abcdef';

/**
 * supertest connects from loopback; an empty trusted list makes that connection count as one from
 * another machine (the trust logic is the same for any address not on the list).
 */
let harness: Harness;
beforeEach(() => {
  harness = openHarness({ accessToken: TOKEN, trustedAddresses: [] });
});
afterEach(() => harness.close());

describe('access control', () => {
  it('when a remote write sends no token, then it gets 401 and nothing is stored', async () => {
    const response = await request(harness.app).post('/api/surveys').send({ name: 'x' }).expect(401);
    expect(response.body.error.code).toBe('token-required');
    expect(rowCount(harness.db, 'surveys')).toBe(0);
  });

  it('when the Authorization header is not "Bearer <token>", then it gets 401 token-malformed', async () => {
    for (const header of [`Basic ${TOKEN}`, `Bearer`, `Bearer  ${TOKEN}`, TOKEN]) {
      const response = await request(harness.app).post('/api/surveys').set('Authorization', header).send({ name: 'x' }).expect(401);
      expect(response.body.error.code).toBe('token-malformed');
    }
  });

  it('when a remote write sends a wrong token, then it gets 403 and nothing is stored', async () => {
    const response = await request(harness.app).post('/api/surveys').set('Authorization', `Bearer ${TOKEN}x`).send({ name: 'x' }).expect(403);
    expect(response.body.error.code).toBe('token-wrong');
    expect(rowCount(harness.db, 'surveys')).toBe(0);
  });

  it('when a remote write sends the token, then it is stored', async () => {
    await request(harness.app).post('/api/surveys').set('Authorization', `Bearer ${TOKEN}`).send({ name: 'x' }).expect(201);
    expect(rowCount(harness.db, 'surveys')).toBe(1);
  });

  it('when a remote client reads or uses the stateless interpret, then no token is needed', async () => {
    await request(harness.app).get('/api/surveys').expect(200);
    await request(harness.app).post('/api/interpret').set('Content-Type', 'text/csv').send(SMALL_PICK_TABLE).expect(200);
  });

  it('when reads are locked, then a remote read needs the token too', async () => {
    const locked = openHarness({ accessToken: TOKEN, trustedAddresses: [], lockReads: true });
    try {
      await request(locked.app).get('/api/surveys').expect(401);
      await request(locked.app).get('/api/surveys').set('Authorization', `Bearer ${TOKEN}`).expect(200);
    } finally {
      locked.close();
    }
  });

  it('when the server has no token and the client is not trusted, then a write with any token gets 403', async () => {
    const open = openHarness({ trustedAddresses: [] });
    try {
      const response = await request(open.app).post('/api/surveys').set('Authorization', `Bearer ${TOKEN}`).send({ name: 'x' }).expect(403);
      expect(response.body.error.message).toContain('no access token');
    } finally {
      open.close();
    }
  });

  it('when the client is on loopback and loopback is trusted (the default), then it writes without a token', async () => {
    const local = openHarness({ accessToken: TOKEN });
    try {
      await request(local.app).post('/api/surveys').send({ name: 'x' }).expect(201);
    } finally {
      local.close();
    }
  });
});
