/**
 * The tail of the engine's command-line entry point (the inspect CLI): how a run ends. Framework-free: node built-ins only.
 *
 *   exit 0  main wrote its report (or whatever code main returns)
 *   exit 2  the input could not be inspected (InspectionError, or a RangeError for a value out of
 *           range): its first line on stderr, nothing on stdout
 *   exit 1  anything else: "internal error:" and the stack on stderr
 */
import { InspectionError } from './reader';

/** The first line of a message: what the entry points print for input they cannot use. */
export function firstLine(message: string): string {
  return message.split('\n')[0];
}

export interface InspectionMainContext {
  /** The file being inspected, once known: a reason that does not name it gets it as a prefix. */
  subject?: string;
}

/** Runs `main`, sets process.exitCode from its result or its error, and resolves to that code. */
export async function runInspectionMain(main: (ctx: InspectionMainContext) => Promise<number>): Promise<number> {
  const ctx: InspectionMainContext = {};
  let code: number;
  try {
    code = await main(ctx);
  } catch (err) {
    if (err instanceof InspectionError || err instanceof RangeError) {
      const line = firstLine(err.message);
      const subject = ctx.subject;
      process.stderr.write(`${subject === undefined || line.includes(subject) ? line : `${subject}: ${line}`}\n`);
      code = 2;
    } else {
      process.stderr.write(`internal error: ${err instanceof Error ? (err.stack ?? String(err)) : String(err)}\n`);
      code = 1;
    }
  }
  process.exitCode = code;
  return code;
}
