/**
 * Child-process entry point for one inspection: reads {file, options} as JSON on stdin, runs the
 * engine, writes { report, preview } as JSON on stdout. Runs outside the web server so a 200 MB G-code never
 * touches the server's heap or event loop, and a crash here cannot take the server down.
 * Exit 0 = report written; exit 2 = the file could not be inspected (one line on stderr); exit 1 =
 * anything else (lib/inspection/main.ts).
 */
import { inspectFileToStore } from '../inspection';
import { runInspectionMain } from '../inspection/main';
import type { InspectOptions } from '../inspection';

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const c of process.stdin) chunks.push(c as Buffer);
  return Buffer.concat(chunks).toString('utf8');
}

async function main(): Promise<number> {
  const job = JSON.parse(await readStdin()) as { file: string; options: InspectOptions };
  // The report contract and, from the same pass, the judges' toolpath preview.
  const stored = await inspectFileToStore(job.file, { ...job.options, preview: true });
  process.stdout.write(JSON.stringify(stored));
  return 0;
}

// No subject: the file is a storage path, not the name the entrant uploaded, so reasons stay as the engine wrote them.
void runInspectionMain(main);
