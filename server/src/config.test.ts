import express from 'express';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { loadConfig } from './config';

const base = { DATABASE_URL: 'postgres://x@127.0.0.1/x', SESSION_SECRET: 'test-secret-123456' };

/** An app that trusts what the settings say and answers the address Express believes. */
function whoCalls(trustProxy: string | undefined) {
  const app = express();
  app.set('trust proxy', loadConfig({ ...base, TRUST_PROXY: trustProxy }).trustProxy);
  app.get('/ip', (req, res) => res.json({ ip: req.ip, protocol: req.protocol }));
  return app;
}

describe('TRUST_PROXY: whose forwarded address and protocol Brink believes', () => {
  it('believes only a proxy on this machine by default', async () => {
    expect(loadConfig(base).trustProxy).toEqual(['loopback']);
    const r = await request(whoCalls(undefined)).get('/ip').set('X-Forwarded-For', '203.0.113.9').set('X-Forwarded-Proto', 'https');
    expect(r.body).toEqual({ ip: '203.0.113.9', protocol: 'https' });
  });

  it('with a load balancer subnet named, a forwarded address from elsewhere is not believed', async () => {
    // supertest calls from 127.0.0.1, which is not in 10.0.0.0/8: the header is someone's claim, not a proxy's.
    const r = await request(whoCalls('10.0.0.0/8, 192.0.2.7'))
      .get('/ip')
      .set('X-Forwarded-For', '203.0.113.9')
      .set('X-Forwarded-Proto', 'https');
    expect(r.body.ip).toMatch(/127\.0\.0\.1$/);
    expect(r.body.protocol).toBe('http');
  });

  it('reads a list of addresses and subnets, and refuses anything else naming the setting', () => {
    expect(loadConfig({ ...base, TRUST_PROXY: ' 10.0.0.0/8 , loopback,2001:db8::/32 ' }).trustProxy).toEqual([
      '10.0.0.0/8',
      'loopback',
      '2001:db8::/32',
    ]);
    for (const bad of ['everyone', '10.0.0.0/33', '10.0.0/8', 'true', '10.0.0.1/8/1']) {
      expect(() => loadConfig({ ...base, TRUST_PROXY: bad }), bad).toThrow(/TRUST_PROXY must list addresses or subnets/);
    }
  });
});
