// Runs s3rver (the local S3 fake) in its own process, so a test process that blocks on a child
// (execFileSync of the seed, say) does not block the fake too. Prints "ready" once listening, then
// one JSON line per S3 event ({ event, key }). Arguments: port, folder.
import S3rver from 's3rver';

const [port, directory] = process.argv.slice(2);
const server = new S3rver({ port: Number(port), address: '127.0.0.1', directory, silent: true });
server.on('event', (e) => {
  for (const r of e.Records) process.stdout.write(`${JSON.stringify({ event: r.eventName, key: decodeURIComponent(r.s3.object.key) })}\n`);
});
await server.run();
process.stdout.write('ready\n');
process.on('SIGTERM', () => server.close().finally(() => process.exit(0)));
