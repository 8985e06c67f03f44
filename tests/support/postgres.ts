/**
 * A throwaway PostgreSQL cluster for the integration run on PostgreSQL (HOTLAP_TEST_DB=postgres):
 * initdb in a temporary folder, started with pg_ctl on a local port (TCP on 127.0.0.1 and a socket
 * in the same folder), trust authentication for the local user `postgres`. initdb refuses to run as
 * root, so as root the cluster belongs to the `postgres` system user (runuser). Needs Debian's
 * `postgresql` package (or PG_BIN pointing at a folder with initdb and pg_ctl).
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

export interface Cluster {
  /** postgres://postgres@127.0.0.1:PORT — add `/dbname`. */
  url: string;
  stop(): void;
}

export function postgresBin(): string {
  if (process.env.PG_BIN) return process.env.PG_BIN;
  const root = '/usr/lib/postgresql';
  const versions = fs.existsSync(root) ? fs.readdirSync(root).filter((v) => fs.existsSync(path.join(root, v, 'bin', 'initdb'))) : [];
  if (!versions.length) throw new Error("PostgreSQL is not installed: run 'apt-get install -y postgresql' (or set PG_BIN to the folder holding initdb and pg_ctl).");
  versions.sort((a, b) => Number(b) - Number(a));
  return path.join(root, versions[0], 'bin');
}

/** Runs a PostgreSQL program as the cluster's owner (the `postgres` user when we are root). */
function asOwner(bin: string, args: string[]) {
  const program = path.join(postgresBin(), bin);
  const isRoot = process.getuid?.() === 0;
  execFileSync(isRoot ? 'runuser' : program, isRoot ? ['-u', 'postgres', '--', program, ...args] : args, { stdio: 'pipe', cwd: os.tmpdir() });
}

export function startCluster(port: number): Cluster {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-pg-'));
  if (process.getuid?.() === 0) execFileSync('chown', ['postgres', dir]);
  const data = path.join(dir, 'data');
  asOwner('initdb', ['-D', data, '-U', 'postgres', '-A', 'trust', '-E', 'UTF8', '--no-sync']);
  // fsync off: a test cluster is thrown away; it only makes commits quicker.
  const opts = `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=200`;
  asOwner('pg_ctl', ['-D', data, '-o', opts, '-l', path.join(dir, 'log'), '-w', '-t', '60', 'start']);
  return {
    url: `postgres://postgres@127.0.0.1:${port}`,
    stop() {
      try {
        asOwner('pg_ctl', ['-D', data, '-m', 'immediate', '-w', 'stop']);
      } finally {
        fs.rmSync(dir, { recursive: true, force: true });
      }
    },
  };
}

/** Creates an empty database on the cluster of `clusterUrl` (synchronously, through psql). */
export function createDatabase(clusterUrl: string, name: string) {
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`Not a plain database name: ${name}`);
  execFileSync(path.join(postgresBin(), 'psql'), [`${clusterUrl}/postgres`, '-v', 'ON_ERROR_STOP=1', '-q', '-c', `CREATE DATABASE ${name}`], { stdio: 'pipe' });
}
