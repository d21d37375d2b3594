/**
 * A private single-node Slurm cluster on loopback for the batch tests: its own munge key and socket, its own
 * slurm.conf (slurm.conf(5) as Slurm documents it), state, spool and log folders under `.tidemark/slurm-<slot>/`,
 * free ports, and daemons started here in the foreground (`-D`) so that `stop()` ends exactly the processes it
 * started. Debian's slurm-wlm and munge are installed by `npm test` (scripts/lib/bootstrap.mjs) when root.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { chmodSync, existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import net from 'node:net';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const BINARIES = ['munged', 'slurmctld', 'slurmd', 'sbatch', 'squeue', 'sinfo'] as const;

function which(name: string): string | null {
  for (const dir of ['/usr/sbin', '/usr/bin', '/sbin', '/bin', ...(process.env.PATH ?? '').split(':')]) {
    const p = join(dir, name);
    if (dir !== '' && existsSync(p)) return p;
  }
  return null;
}

/** Why a private cluster cannot be started here, or null when it can. */
export function slurmUnavailable(): string | null {
  const missing = BINARIES.filter((b) => which(b) === null);
  if (missing.length > 0) return `Slurm binaries missing (${missing.join(', ')}): npm test installs Debian's slurm-wlm and munge when run as root`;
  if (typeof process.getuid === 'function' && process.getuid() !== 0) return 'a private Slurm cluster needs root here (slurmd launches job steps as their owner)';
  return null;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

export interface SlurmCluster {
  /** Environment for client commands (SLURM_CONF). */
  env: NodeJS.ProcessEnv;
  dir: string;
  partition: string;
  stop: () => Promise<void>;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Starts munged, slurmctld and slurmd; resolves once the node is idle. */
export async function startSlurmCluster(): Promise<SlurmCluster> {
  const slot = process.env.TIDEMARK_TEST_SLOT ?? '0';
  const dir = join(root, '.tidemark', `slurm-${slot}`);
  rmSync(dir, { recursive: true, force: true });
  for (const d of ['munge', 'state', 'spool', 'log']) mkdirSync(join(dir, d), { recursive: true });
  chmodSync(join(dir, 'munge'), 0o700);
  const key = join(dir, 'munge', 'munge.key');
  writeFileSync(key, randomBytes(128), { mode: 0o400 });
  const socket = join(dir, 'munge', 'munge.socket');
  const [ctldPort, slurmdPort] = [await freePort(), await freePort()];
  const host = hostname().split('.')[0];
  const partition = 'tidepool';
  const conf = join(dir, 'slurm.conf');
  writeFileSync(
    conf,
    [
      'ClusterName=tidemark-test',
      `SlurmctldHost=${host}(127.0.0.1)`,
      `SlurmctldPort=${ctldPort}`,
      `SlurmdPort=${slurmdPort}`,
      'AuthType=auth/munge',
      'CredType=cred/munge',
      `AuthInfo=socket=${socket}`,
      'SlurmUser=root',
      'SlurmdUser=root',
      `StateSaveLocation=${join(dir, 'state')}`,
      `SlurmdSpoolDir=${join(dir, 'spool')}`,
      `SlurmctldPidFile=${join(dir, 'slurmctld.pid')}`,
      `SlurmdPidFile=${join(dir, 'slurmd.pid')}`,
      `SlurmctldLogFile=${join(dir, 'log', 'slurmctld.log')}`,
      `SlurmdLogFile=${join(dir, 'log', 'slurmd.log')}`,
      'ProctrackType=proctrack/linuxproc',
      'TaskPlugin=task/none',
      'JobAcctGatherType=jobacct_gather/none',
      'AccountingStorageType=accounting_storage/none',
      'JobCompType=jobcomp/none',
      'SchedulerType=sched/builtin',
      'SelectType=select/cons_tres',
      'SelectTypeParameters=CR_Core_Memory',
      'MpiDefault=none',
      'ReturnToService=2',
      'MailProg=/bin/true',
      'SlurmctldTimeout=30',
      'SlurmdTimeout=30',
      'InactiveLimit=0',
      'MinJobAge=300',
      `NodeName=tmnode NodeAddr=127.0.0.1 NodeHostname=${host} CPUs=2 RealMemory=2000 State=UNKNOWN`,
      `PartitionName=${partition} Nodes=tmnode Default=YES MaxTime=INFINITE State=UP`,
      '',
    ].join('\n'),
  );
  const env = { ...process.env, SLURM_CONF: conf };
  const children: ChildProcess[] = [];
  const start = (cmd: string, args: string[]) => {
    const child = spawn(cmd, args, { env, stdio: ['ignore', 'ignore', 'pipe'] });
    let err = '';
    child.stderr?.on('data', (c) => (err += c.toString()));
    children.push(child);
    return () => err;
  };
  const stop = async () => {
    for (const child of children.reverse()) {
      if (child.exitCode !== null || child.signalCode !== null) continue;
      await new Promise<void>((resolve) => {
        const timer = setTimeout(() => child.kill('SIGKILL'), 10_000);
        child.once('exit', () => {
          clearTimeout(timer);
          resolve();
        });
        child.kill('SIGTERM');
      });
    }
  };
  try {
    const mungeErr = start(which('munged') as string, ['--foreground', '--force', `--socket=${socket}`, `--key-file=${key}`, `--pid-file=${join(dir, 'munge', 'munged.pid')}`, `--log-file=${join(dir, 'log', 'munged.log')}`, `--seed-file=${join(dir, 'munge', 'munged.seed')}`]);
    for (let i = 0; i < 50 && !existsSync(socket); i++) await sleep(100);
    if (!existsSync(socket)) throw new Error(`munged did not start: ${mungeErr().trim()}`);
    const ctldErr = start(which('slurmctld') as string, ['-D', '-i', '-f', conf]);
    const slurmdErr = start(which('slurmd') as string, ['-D', '-N', 'tmnode', '-f', conf]);
    for (let i = 0; i < 120; i++) {
      const r = spawnSync('sinfo', ['--noheader', '--format', '%T'], { env, encoding: 'utf8' });
      if (r.status === 0 && /^idle/m.test(r.stdout)) return { env, dir, partition, stop };
      if (children.some((c) => c.exitCode !== null)) break;
      await sleep(250);
    }
    throw new Error(`the private Slurm cluster did not come up: slurmctld: ${ctldErr().trim().split('\n').pop()}; slurmd: ${slurmdErr().trim().split('\n').pop()}`);
  } catch (e) {
    await stop();
    throw e;
  }
}
