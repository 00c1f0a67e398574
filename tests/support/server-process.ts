// Starts the real server (`server/main.ts`) in a child process for the tests that need a process
// of their own: graceful shutdown, start-up seeding, SIGKILL metering. It runs as `npm start`
// does (without the build, npm or the memory flag): `node --import tsx server/main.ts`, one
// process that receives the signals itself. (The tsx command would put a relay process in front, which
// SIGKILLs the server when it does not acknowledge a SIGTERM within about 60 ms, as happens to a
// server busy under load: the drain would never run.)
// `port` resolves once main.ts logs its URL (start it with PORT=0 for an ephemeral port).
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';

const ROOT = path.resolve(import.meta.dirname, '../..');

export interface ServerProcess {
  child: ChildProcess;
  port: Promise<number>;
  /** How the process ended: its exit code, or the signal that ended it. */
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  output(): string;
}

/**
 * `detached`: the server leads its own process group, so a test can end it and anything it
 * started with one kill sent to the group (`process.kill(-pid, 'SIGKILL')`).
 */
export function startServerProcess(
  env: Record<string, string>,
  opts: { detached?: boolean } = {},
): ServerProcess {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: opts.detached ?? false,
  });
  let output = '';
  const port = new Promise<number>((resolve, reject) => {
    const onData = (chunk: Buffer) => {
      output += chunk.toString();
      const m = /listening on http:\/\/localhost:(\d+)/.exec(output);
      if (m?.[1]) resolve(Number(m[1]));
    };
    child.stdout?.on('data', onData);
    child.stderr?.on('data', onData);
    child.on('exit', (code, signal) =>
      reject(new Error(`server exited early (${code ?? signal}): ${output}`)),
    );
  });
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.on('exit', (code, signal) => resolve({ code, signal })),
  );
  return { child, port, exited, output: () => output };
}
