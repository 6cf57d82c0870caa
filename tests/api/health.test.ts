import path from 'node:path';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { appUrl, required } from '../support/env';

// The services module is plain JavaScript shared with the start/test scripts.
type ServicesModule = {
  startPostgres: (o: { dataDir: string; port: number; fast?: boolean }) => Promise<unknown>;
  stopPostgres: (o: { dataDir: string }) => void;
};
const servicesPath = path.join(process.cwd(), 'scripts', 'lib', 'services.mjs');

describe('GET /api/health', () => {
  it('answers 200 with database, storage and mail all up', async () => {
    const res = await request(appUrl()).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('ok');
    for (const name of ['database', 'storage', 'mail']) expect(res.body.services[name].ok).toBe(true);
  });

  it('answers 503 naming the database while PostgreSQL is down, and 200 once it is back', async () => {
    const services = (await import(servicesPath)) as ServicesModule;
    const dataDir = required('VARIGATE_TEST_DATA_DIR');
    const port = Number(required('VARIGATE_TEST_PG_PORT'));
    services.stopPostgres({ dataDir });
    try {
      const res = await request(appUrl()).get('/api/health');
      expect(res.status).toBe(503);
      expect(res.body.down).toEqual(['database']);
      expect(res.body.message).toContain('database');
      expect(res.body.services.storage.ok).toBe(true);
    } finally {
      await services.startPostgres({ dataDir, port, fast: true });
    }
    // postgres.js reconnects on its own once the server is back.
    let status = 0;
    for (let i = 0; i < 20 && status !== 200; i++) {
      status = (await request(appUrl()).get('/api/health')).status;
      if (status !== 200) await new Promise((r) => setTimeout(r, 500));
    }
    expect(status).toBe(200);
  });

  it('carries the security headers, with the running object store allowed for uploads', async () => {
    for (const path of ['/api/health', '/sign-in']) {
      const res = await request(appUrl()).get(path);
      const csp = res.headers['content-security-policy'] as string;
      expect(csp, path).toContain("frame-ancestors 'none'");
      expect(csp, path).toContain(`connect-src 'self' ${new URL(required('S3_ENDPOINT')).origin}`);
      expect(res.headers['x-frame-options'], path).toBe('DENY');
      expect(res.headers['referrer-policy'], path).toBe('strict-origin-when-cross-origin');
      expect(res.headers['x-content-type-options'], path).toBe('nosniff');
    }
  });
});
