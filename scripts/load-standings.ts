/**
 * Load run of the standings endpoint: 50 000 generated entries (scripts/bench-standings.ts), the
 * built app on 127.0.0.1, then autocannon with 20 connections for 20 s against the standings page
 * of the largest class. Prints requests per second and latency percentiles.
 *
 *   npx next build && npx tsx scripts/load-standings.ts [--entries 50000] [--connections 20] [--seconds 20]
 */
import fs from 'node:fs';
import autocannon from 'autocannon';
import { arg, generate, startApp } from './bench-standings';

async function main() {
  const entries = arg('entries', 50_000);
  const connections = arg('connections', 20);
  const seconds = arg('seconds', 20);
  const port = Number(process.env.HOTLAP_TEST_PORT || 3100) + 51;
  const gen = await generate(entries, port);
  const server = await startApp(gen, port);
  try {
    const url = `${server.url}/api/v1/seasons/${gen.season}/classes/open-04/standings`;
    // Warm the ranking cache and the server's code paths before measuring.
    for (let i = 0; i < 20; i++) await (await fetch(url)).arrayBuffer();
    console.log(`autocannon: ${connections} connections, ${seconds} s, GET ${url.replace(server.url, '')}`);
    const result = await autocannon({ url, connections, duration: seconds });
    const l = result.latency;
    console.log(`requests: ${result.requests.total} total, ${result.requests.average.toFixed(0)} req/s average (min ${result.requests.min}, max ${result.requests.max})`);
    console.log(`latency ms: p50 ${l.p50}, p90 ${l.p90}, p99 ${l.p99}, max ${l.max}, mean ${l.average.toFixed(1)}`);
    console.log(`errors ${result.errors}, timeouts ${result.timeouts}, non-2xx ${result.non2xx}; throughput ${(result.throughput.average / 1024).toFixed(0)} KiB/s`);
  } finally {
    await server.stop();
    fs.rmSync(gen.dataDir, { recursive: true, force: true });
  }
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err instanceof Error ? err.stack : err);
    process.exit(1);
  },
);
