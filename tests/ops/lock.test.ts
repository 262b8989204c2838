/**
 * The pid lock that stops a second `npm start` (server/ops/sys.mjs): atomic creation, a clear refusal
 * while the holder lives, take-over when it is gone. Liveness is checked against real processes.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { OpsError, acquireLock, freePort, pidAlive, portInUse } from '../../server/ops/sys.mjs';

let dir = '';
beforeEach(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tetrawell-lock-'));
});
afterEach(() => {
  fs.rmSync(dir, { recursive: true, force: true });
});

/** The pid of a process that has certainly exited (spawned, waited for and reaped). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(r.stdout);
}

describe('pid liveness', () => {
  it('sees this process and its parent as alive and a reaped child as gone', () => {
    expect(pidAlive(process.pid)).toBe(true);
    expect(pidAlive(process.ppid)).toBe(true);
    expect(pidAlive(deadPid())).toBe(false);
    expect(pidAlive(0)).toBe(false);
    expect(pidAlive(-1)).toBe(false);
  });
});

describe('the start lock', () => {
  it('refuses a second holder while the first is alive, naming its pid and how to stop it', () => {
    const file = path.join(dir, 'start.lock');
    // Another live process (our parent) holds the lock.
    fs.writeFileSync(file, JSON.stringify({ pid: process.ppid, startedAt: 'earlier', url: 'http://127.0.0.1:8080' }));
    let err: unknown = null;
    try {
      acquireLock(file, 'Tetrawell (npm start)');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(OpsError);
    expect((err as Error).message).toContain(`pid ${process.ppid}`);
    expect((err as Error).message).toContain('already running');
    expect((err as Error).message).toContain('http://127.0.0.1:8080');
    // The holder's record rides along, so `npm run migrate` can reuse a running start's database.
    expect((err as OpsError).holder).toMatchObject({ pid: process.ppid, url: 'http://127.0.0.1:8080' });
    // The live holder's file is left alone.
    expect(JSON.parse(fs.readFileSync(file, 'utf8')).pid).toBe(process.ppid);
  });

  it('takes over a lock whose holder is gone and reports what it said', () => {
    const file = path.join(dir, 'start.lock');
    const gone = deadPid();
    fs.writeFileSync(file, JSON.stringify({ pid: gone, serverPid: 4242 }));
    const lock = acquireLock(file, 'x');
    expect(lock.stale).toMatchObject({ pid: gone, serverPid: 4242 });
    expect(JSON.parse(fs.readFileSync(file, 'utf8')).pid).toBe(process.pid);
    lock.update({ url: 'http://127.0.0.1:9' });
    expect(JSON.parse(fs.readFileSync(file, 'utf8'))).toMatchObject({ pid: process.pid, url: 'http://127.0.0.1:9' });
    lock.release();
    expect(fs.existsSync(file)).toBe(false);
  });

  it('treats an unreadable (half-written) lock file as stale', () => {
    const file = path.join(dir, 'start.lock');
    fs.writeFileSync(file, '{"pid": 12');
    const lock = acquireLock(file, 'x');
    expect(lock.stale).toBeNull();
    lock.release();
  });

  it('does not delete a lock that another process has taken since', () => {
    const file = path.join(dir, 'start.lock');
    const lock = acquireLock(file, 'x');
    fs.writeFileSync(file, JSON.stringify({ pid: process.ppid }));
    lock.release();
    expect(fs.existsSync(file)).toBe(true);
  });
});

describe('ports', () => {
  it('finds a free loopback port and notices when something listens on it', async () => {
    const port = await freePort();
    expect(port).toBeGreaterThan(0);
    expect(await portInUse(port)).toBe(false);
    const srv = net.createServer();
    await new Promise<void>((r) => srv.listen(port, '127.0.0.1', () => r()));
    try {
      expect(await portInUse(port)).toBe(true);
    } finally {
      await new Promise<void>((r) => srv.close(() => r()));
    }
  });
});
