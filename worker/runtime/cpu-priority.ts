import fs from 'node:fs';
import os from 'node:os';

/**
 * Lowers the worker's CPU priority to `nice` so its heavy work yields to the server, which must keep answering
 * people while clips process. On Linux niceness is per thread and a new thread inherits its creator's, so the main
 * thread is lowered first (the frame pool, ffmpeg children and later libuv threads then start nice) and then every
 * thread that already runs: V8's helpers exist from the process's start, and libuv's pool from its first file read.
 * Only ever lowered: a process may not raise its own priority, and one started nicer than this stays so.
 */
export function lowerCpuPriority(nice: number): void {
  const threads = process.platform === 'linux' ? fs.readdirSync('/proc/self/task').map(Number) : [];
  for (const id of [process.pid, ...threads.filter((tid) => tid !== process.pid)]) {
    try {
      if (os.getPriority(id) < nice) os.setPriority(id, nice);
    } catch (error) {
      // A thread that ended since the listing has nothing left to lower.
      if ((error as { info?: { code?: string } }).info?.code !== 'ESRCH') throw error;
    }
  }
}
