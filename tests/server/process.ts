import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';
import { TEST_SECRET } from './helpers';

/** A Cairn server running in a process of its own, so a test can kill it hard and start it again. */
export interface CairnProcess {
  baseUrl: string;
  child: ChildProcess;
  /** Ends the process with SIGKILL: no shutdown code runs, as in a power cut. */
  kill(): Promise<void>;
  /** Ends the process with SIGTERM and waits for its clean shutdown. */
  stop(): Promise<void>;
}

/** A free TCP port on loopback. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

/** Starts `server/index.ts` in a child process on a data folder and port, and waits for its health check. */
export async function startCairnProcess(dataDir: string, port: number, env: Record<string, string> = {}): Promise<CairnProcess> {
  const root = path.resolve(import.meta.dirname, '..', '..');
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'test',
      PORT: String(port),
      HOST: '127.0.0.1',
      DATA_DIR: dataDir,
      JWT_SECRET: TEST_SECRET,
      LOG_LEVEL: 'warn',
      PUBLIC_URL: `http://127.0.0.1:${port}`,
      ...env,
    },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  child.stderr?.on('data', (d: Buffer) => (stderr += d.toString()));
  const baseUrl = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`Cairn exited early (${child.exitCode}): ${stderr}`);
    try {
      const res = await fetch(`${baseUrl}/api/health`);
      if (res.ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`Cairn did not start within 30 s: ${stderr}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  const exited = () => new Promise<void>((resolve) => (child.exitCode !== null ? resolve() : child.once('exit', () => resolve())));
  return {
    baseUrl,
    child,
    async kill() {
      child.kill('SIGKILL');
      await exited();
    },
    async stop() {
      child.kill('SIGTERM');
      await exited();
    },
  };
}
