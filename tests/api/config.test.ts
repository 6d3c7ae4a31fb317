import { describe, expect, it } from 'vitest';
import { ConfigError, DEFAULT_JSON_BODY_LIMIT, DEFAULT_MAX_UPLOAD_BYTES, parseConfig } from '../../server/config.js';

describe('parseConfig', () => {
  it('when only dataDir is given, then parseConfig fills the documented defaults', () => {
    expect(parseConfig({ dataDir: 'data' })).toEqual({
      host: '127.0.0.1', port: 8080, dataDir: 'data', lockReads: false,
      maxUploadBytes: DEFAULT_MAX_UPLOAD_BYTES, maxUploadRequestBytes: 4 * DEFAULT_MAX_UPLOAD_BYTES, maxFilesPerUpload: 200, jsonBodyLimit: DEFAULT_JSON_BODY_LIMIT,
      allowedHostNames: [], maxInterpretPicks: 100_000,
      trustedAddresses: ['127.0.0.1', '::1', '::ffff:127.0.0.1'],
    });
    expect(DEFAULT_MAX_UPLOAD_BYTES).toBe(50 * 1024 * 1024);
  });

  it('when keys are wrong, then parseConfig throws ConfigError naming every bad key', () => {
    let caught: unknown;
    try {
      parseConfig({ dataDir: '', port: 70000, accessToken: 'short', colour: 'blue' });
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(ConfigError);
    const message = (caught as ConfigError).message;
    for (const key of ['dataDir', 'port', 'accessToken', 'colour']) expect(message).toContain(key);
  });
});
