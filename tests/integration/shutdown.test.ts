// SIGTERM: the server stops accepting, finishes the request in flight, closes its database pool and exits 0.
import fs from 'node:fs';
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

/** Pids of the processes whose parent is `pid` (Linux /proc/<pid>/stat, proc(5): the 4th field is the parent). */
function childrenOf(pid: number): number[] {
  const out: number[] = [];
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, 'utf8');
      if (Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) === pid) out.push(Number(entry));
    } catch {
      // ended while we looked
    }
  }
  return out;
}

describe('several app processes (TIDEMARK_WORKERS)', () => {
  it('serves from two processes, replaces one that dies, and stops both cleanly on SIGTERM', async () => {
    const app = await startInstance({ TIDEMARK_WORKERS: '2' });
    const exited = new Promise<number | null>((resolve) => app.child.once('exit', (code) => resolve(code)));
    const signIn = () => fetch(`${app.url}/sign-in`).then((r) => r.status);
    await expect.poll(() => childrenOf(app.child.pid!).length, { timeout: 20_000 }).toBe(2);
    expect(await Promise.all(Array.from({ length: 10 }, signIn))).toEqual(Array(10).fill(200));
    // One app process dies; the other keeps answering and the supervisor starts a replacement.
    const [first] = childrenOf(app.child.pid!);
    process.kill(first, 'SIGKILL');
    // A connection handed out in the instant the process died may be reset; the next one is answered.
    await expect.poll(() => signIn().catch(() => 0), { timeout: 10_000 }).toBe(200);
    await expect.poll(() => childrenOf(app.child.pid!).filter((p) => p !== first).length, { timeout: 20_000 }).toBe(2);
    // The replacement is serving (two processes listened at the start, the third is the new one).
    await expect.poll(() => app.output().match(/Server listening/g)?.length ?? 0, { timeout: 20_000 }).toBe(3);
    expect(app.output()).toContain(`app process ${first} exited (SIGKILL); starting another`);
    app.child.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(app.output().match(/SIGTERM: finishing requests in flight, then stopping/g)).toHaveLength(2);
    await expect(fetch(`${app.url}/sign-in`)).rejects.toThrow();
  }, 60_000);

  it('stops, with the reason, when an app process cannot start (the port is taken), instead of restarting it for ever', async () => {
    const taken = http.createServer();
    await new Promise<void>((resolve) => taken.listen(0, '127.0.0.1', resolve));
    const port = (taken.address() as { port: number }).port;
    try {
      await expect(startInstance({ TIDEMARK_WORKERS: '2', PORT: String(port) }, { timeoutMs: 30_000 })).rejects.toThrow(/before it served; stopping/);
    } finally {
      taken.close();
    }
  }, 60_000);
});
