// Requests fetch cannot make (a body streamed in chunks with no Content-Length, or a Content-Length
// the body never delivers) and the test server's memory, read from outside the app through /proc.
import fs from 'node:fs';
import http from 'node:http';
import { baseUrl } from './http';

export interface RawAnswer {
  status: number;
  body: string;
  /** body bytes written before the server answered or closed the connection */
  sent: number;
}

/**
 * POSTs `total` bytes in 64 KB chunks (Transfer-Encoding: chunked unless a content-length header is
 * given), stops writing as soon as the server answers, and resolves with that answer.
 */
export function streamPost(
  path: string,
  opts: { total: number; headers?: Record<string, string>; fill?: string; method?: string },
): Promise<RawAnswer> {
  const url = new URL(path, baseUrl());
  const chunk = Buffer.alloc(64 * 1024, opts.fill ?? 'a');
  return new Promise((resolve, reject) => {
    let sent = 0;
    let answered = false;
    // A connection of its own (a refused body is never finished, so the socket must not be reused),
    // kept alive as a browser's is: a client that sends `Connection: close` is closed on at once.
    const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
    const req = http.request(url, { method: opts.method ?? 'POST', agent, headers: { origin: url.origin, ...opts.headers } });
    req.on('close', () => agent.destroy());
    req.on('response', (res) => {
      answered = true;
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (d: string) => (body += d));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body, sent }));
      res.on('error', () => resolve({ status: res.statusCode ?? 0, body, sent }));
    });
    // The server may close the connection while we are still writing: that is an answer too only
    // once the response arrived; before that it is a failure.
    req.on('error', (error) => {
      if (!answered) reject(error);
    });
    const write = () => {
      while (!answered && !req.destroyed && sent < opts.total) {
        const piece = opts.total - sent >= chunk.length ? chunk : chunk.subarray(0, opts.total - sent);
        sent += piece.length;
        if (!req.write(piece)) {
          req.once('drain', write);
          return;
        }
      }
      if (!answered && !req.destroyed && sent >= opts.total) req.end();
    };
    write();
  });
}

/** The pid of the process listening on the test server's port (found through /proc/net/tcp). */
export function serverPid(): number {
  const port = Number(new URL(baseUrl()).port);
  const hexPort = port.toString(16).toUpperCase().padStart(4, '0');
  const inodes = new Set<string>();
  for (const table of ['/proc/net/tcp', '/proc/net/tcp6']) {
    if (!fs.existsSync(table)) continue;
    for (const line of fs.readFileSync(table, 'utf8').split('\n').slice(1)) {
      const cols = line.trim().split(/\s+/);
      // local_address is "IP:PORT", st 0A is LISTEN, inode is the 10th column
      if (cols.length > 9 && cols[1].endsWith(`:${hexPort}`) && cols[3] === '0A') inodes.add(cols[9]);
    }
  }
  for (const pid of fs.readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
    let fds: string[];
    try {
      fds = fs.readdirSync(`/proc/${pid}/fd`);
    } catch {
      continue;
    }
    for (const fd of fds) {
      try {
        const m = /^socket:\[(\d+)\]$/.exec(fs.readlinkSync(`/proc/${pid}/fd/${fd}`));
        if (m && inodes.has(m[1])) return Number(pid);
      } catch {
        // the fd closed while we looked
      }
    }
  }
  throw new Error(`no process listens on port ${port}`);
}

/** Resident memory of a process in bytes. */
export function rssOf(pid: number): number {
  const kb = /VmRSS:\s+(\d+)\s+kB/.exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1];
  if (!kb) throw new Error(`no VmRSS for pid ${pid}`);
  return Number(kb) * 1024;
}

/** Samples a process's RSS every 20 ms while `work` runs; resolves with its result and the peak. */
export async function peakRssDuring<T>(pid: number, work: () => Promise<T>): Promise<{ result: T; before: number; peak: number }> {
  const before = rssOf(pid);
  let peak = before;
  const timer = setInterval(() => {
    try {
      peak = Math.max(peak, rssOf(pid));
    } catch {
      // the process is gone: the caller's assertions will say so
    }
  }, 20);
  try {
    const result = await work();
    peak = Math.max(peak, rssOf(pid));
    return { result, before, peak };
  } finally {
    clearInterval(timer);
  }
}
