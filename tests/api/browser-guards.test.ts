/**
 * Guards against a web page turning a browser on the service's own machine against it (DNS
 * rebinding, cross-site writes), the If-Match tag rules (RFC 9110: strong comparison), and the
 * size bound of one interpretation. supertest over a real SQLite file (tests/api/api-harness.ts).
 */
import { afterEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { openHarness, sampleSurvey, rowCount, type Harness } from './api-harness.js';
import { hostAllowed, hostNameOf } from '../../server/same-origin.js';

describe('browser guards', () => {
  let harness: Harness;
  afterEach(() => harness.close());

  it('when a request names a host the service does not answer to (DNS rebinding), then it gets 421 and nothing is stored', async () => {
    harness = openHarness();
    const response = await request(harness.app).post('/api/surveys').set('Host', 'evil.example').send({ name: 'X', scale: 'engineering' });
    expect(response.status).toBe(421);
    expect(response.body.error.code).toBe('host-not-served');
    expect(rowCount(harness.db, 'surveys')).toBe(0);
    const named = openHarness({ allowedHostNames: ['survey-box.office'] });
    expect((await request(named.app).get('/api/health').set('Host', 'survey-box.office:8080')).status).toBe(200);
    named.close();
  });

  it('when a write carries another site\'s Origin or Sec-Fetch-Site: cross-site, then it gets 403; same-origin and scripts pass', async () => {
    harness = openHarness();
    const body = { name: 'Line', scale: 'engineering' };
    const foreign = await request(harness.app).post('/api/surveys').set('Host', '127.0.0.1:8080').set('Origin', 'http://evil.example').send(body);
    expect(foreign.status).toBe(403);
    expect(foreign.body.error.code).toBe('cross-site-write');
    const fetchSite = await request(harness.app).post('/api/surveys').set('Host', '127.0.0.1:8080').set('Sec-Fetch-Site', 'cross-site').send(body);
    expect(fetchSite.status).toBe(403);
    expect(rowCount(harness.db, 'surveys')).toBe(0);
    const same = await request(harness.app).post('/api/surveys').set('Host', '127.0.0.1:8080').set('Origin', 'http://127.0.0.1:8080').send(body);
    expect(same.status).toBe(201);
    expect((await request(harness.app).post('/api/surveys').send(body)).status).toBe(201);
    // Reads from another site's page are not writes: they pass (the data is shared on the network anyway).
    expect((await request(harness.app).get('/api/surveys').set('Origin', 'http://evil.example')).status).toBe(200);
  });

  it('when If-Match is weak, a list or *, then it is refused with 400 naming the rule', async () => {
    harness = openHarness();
    const created = await request(harness.app).post('/api/surveys').send({ name: 'Line', scale: 'engineering' }).expect(201);
    for (const tag of ['W/"v1"', '"v1", "v2"', '*']) {
      const response = await request(harness.app).patch(`/api/surveys/${created.body.id}`).set('If-Match', tag).send({ name: 'Renamed' });
      expect(response.status, tag).toBe(400);
      expect(response.body.error.message).toMatch(/strong/);
    }
  });

  it('when an interpretation request holds more picks than maxInterpretPicks, then it gets 413 naming both numbers', async () => {
    harness = openHarness({ maxInterpretPicks: 100 });
    const response = await request(harness.app).post('/api/interpret').set('Content-Type', 'text/csv').send(sampleSurvey('millbrook-quarry-bedrock').toString('utf8'));
    expect(response.status).toBe(413);
    expect(response.body.error.code).toBe('interpretation-too-large');
    expect(response.body.error.details).toEqual({ pickCount: 240, maxInterpretPicks: 100 });
  });
});

describe('hostNameOf and hostAllowed', () => {
  it('read the name from Host values with ports and IPv6 brackets, and allow IP literals, localhost and listed names only', () => {
    expect(hostNameOf('[::1]:8080')).toBe('::1');
    expect(hostNameOf('Box.Office:80')).toBe('box.office');
    expect(hostNameOf('192.0.2.7')).toBe('192.0.2.7');
    expect(hostAllowed('192.0.2.7:8080', [])).toBe(true);
    expect(hostAllowed('localhost:8080', [])).toBe(true);
    expect(hostAllowed('evil.example', [])).toBe(false);
    expect(hostAllowed('box.office', ['Box.Office'])).toBe(true);
    expect(hostAllowed(undefined, [])).toBe(true);
  });
});
