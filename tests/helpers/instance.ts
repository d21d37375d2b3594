// A second instance of the built app (server/main.mjs over the same build and database as the one npm test serves),
// started with settings a test chooses: a trusted proxy, another build folder, production launcher settings.
import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';

export const repoRoot = path.resolve(__dirname, '..', '..');

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

export interface Instance {
  url: string;
  child: ChildProcess;
  output: () => string;
  stop: () => Promise<void>;
}

/** Runs `node <script>` with `env` on top of the test environment; resolves once it prints `readyLine`. */
export async function startInstance(
  env: Record<string, string | undefined>,
  { script = 'server/main.mjs', args = [] as string[], readyLine = 'Server listening', timeoutMs = 60_000, inherit = true } = {},
): Promise<Instance> {
  const port = Number(env.PORT ?? env.TIDEMARK_PORT ?? (await freePort()));
  const merged: Record<string, string> = {};
  for (const [k, v] of Object.entries({ ...(inherit ? process.env : {}), HOST: '127.0.0.1', PORT: String(port), TIDEMARK_PORT: String(port), ...env })) {
    if (v !== undefined) merged[k] = v;
  }
  const child = spawn(process.execPath, [path.join(repoRoot, script), ...args], { cwd: repoRoot, env: merged, stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  child.stdout!.on('data', (c) => (out += c));
  child.stderr!.on('data', (c) => (out += c));
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`${script} did not print "${readyLine}" within ${timeoutMs} ms:\n${out}`)), timeoutMs);
    const check = () => {
      if (out.includes(readyLine)) {
        clearTimeout(timer);
        resolve();
      }
    };
    child.stdout!.on('data', check);
    child.on('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`${script} exited (${code}) before it was ready:\n${out}`));
    });
  });
  return {
    url: `http://127.0.0.1:${port}`,
    child,
    output: () => out,
    stop: () =>
      new Promise((resolve) => {
        // A child ended by a signal (a test's SIGKILL) has signalCode set and exitCode still null.
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        child.once('exit', () => resolve());
        child.kill('SIGTERM');
      }),
  };
}

/** Runs `node <script>` to completion; returns its exit code and output. */
export function runToEnd(script: string, env: Record<string, string | undefined>, args: string[] = [], timeoutMs = 60_000): Promise<{ code: number | null; output: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [...(script.endsWith('.ts') ? ['--import', 'tsx'] : []), path.join(repoRoot, script), ...args], {
      cwd: repoRoot,
      env: Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined)) as Record<string, string>,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    child.stdout.on('data', (c) => (out += c));
    child.stderr.on('data', (c) => (out += c));
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
      reject(new Error(`${script} ran over ${timeoutMs} ms:\n${out}`));
    }, timeoutMs);
    child.on('exit', (code) => {
      clearTimeout(timer);
      resolve({ code, output: out });
    });
  });
}
