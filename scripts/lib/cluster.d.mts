// Types of cluster.mjs for the TypeScript tests and benchmarks that start a cluster.
import type { ChildProcess } from 'node:child_process';

export interface Started {
  child: ChildProcess;
  stop(): Promise<void>;
}
export declare const REDIS_PACKAGES: { bin: string; packages: string[] };
export declare const HAPROXY_PACKAGES: { bin: string; packages: string[] };
export declare function listening(port: number): Promise<boolean>;
export declare function redisCommand(port: number, command: string, timeoutMs?: number): Promise<string | null>;
export declare function startRedis(opts: { dir: string; port: number }): Promise<Started>;
export declare function haproxyConfig(opts: { port: number; backends: number[]; dir: string }): string;
export declare function startHaproxy(opts: { dir: string; port: number; backends: number[] }): Promise<Started>;
export declare function stopChild(child: ChildProcess): Promise<void>;
export declare function clusterProcessEnv(opts: {
  redisPort: number;
  proxyPort: number;
  port: number;
  jobs?: boolean;
}): Record<string, string>;
