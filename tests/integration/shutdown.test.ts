// SIGTERM: the server stops accepting, finishes the request in flight, closes its database pool and exits 0.
import http from 'node:http';
import { describe, expect, it } from 'vitest';
import { startInstance } from '../helpers/instance';

describe('clean shutdown', () => {
  it('finishes a request that is still arriving when SIGTERM comes, then refuses new ones and exits 0', async () => {
    const app = await startInstance({});
    const exited = new Promise<number | null>((resolve) => app.child.once('exit', (code) => resolve(code)));
    const answer = new Promise<number>((resolve, reject) => {
      const req = http.request(`${app.url}/sign-in`, {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded', 'transfer-encoding': 'chunked', origin: app.url },
      });
      req.on('response', (res) => {
        res.resume();
        resolve(res.statusCode ?? 0);
      });
      req.on('error', reject);
      req.write('email=nobody%40fixture.example&');
      setTimeout(() => {
        app.child.kill('SIGTERM');
        setTimeout(() => req.end('password=wrong-password-1'), 300);
      }, 200);
    });
    // The half-sent request was answered (a wrong password: 400), not cut off.
    expect(await answer).toBe(400);
    expect(await exited).toBe(0);
    expect(app.output()).toContain('SIGTERM: finishing requests in flight, then stopping');
    await expect(fetch(`${app.url}/sign-in`)).rejects.toThrow();
  }, 30_000);
});
