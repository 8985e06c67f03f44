/**
 * Command line: npm run inspect -- FILE [--rules rules.json] [--filament-diameter 1.75]
 *                                       [--material pla] [--json]
 * Exit 0 with a report; exit 2 with one line on stderr when the file (or an option) cannot be used.
 */
import { readFile } from 'node:fs/promises';
import { inspectFile } from './inspect';
import { toJsonReport, type EngineReport } from './report';
import { RulebookSchema, type Rule, type RuleResult } from './rules';
import { MATERIAL_FAMILIES, isMaterialFamily } from './materials';
import { runInspectionMain, firstLine, type InspectionMainContext } from './main';

const USAGE = 'usage: npm run inspect -- FILE [--rules rules.json] [--filament-diameter 1.75] [--material pla] [--json]';

interface CliArgs {
  file: string;
  rulesPath: string | null;
  diameterMm: number | undefined;
  material: string | undefined;
  json: boolean;
}

class UsageError extends Error {}

function parseArgs(argv: string[]): CliArgs {
  let file: string | null = null;
  let rulesPath: string | null = null;
  let diameterMm: number | undefined;
  let material: string | undefined;
  let json = false;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const next = (): string => {
      const v = argv[++i];
      if (v === undefined) throw new UsageError(`${a} needs a value. ${USAGE}`);
      return v;
    };
    if (a === '--json') json = true;
    else if (a === '--rules') rulesPath = next();
    else if (a === '--filament-diameter') {
      const v = Number(next());
      if (!(v > 0 && v < 10)) throw new UsageError('--filament-diameter must be a diameter in mm, e.g. 1.75 or 2.85.');
      diameterMm = v;
    } else if (a === '--material') material = next().toLowerCase();
    else if (a === '--help' || a === '-h') throw new UsageError(USAGE);
    else if (a.startsWith('--')) throw new UsageError(`Unknown option ${a}. ${USAGE}`);
    else if (file === null) file = a;
    else throw new UsageError(`Only one file at a time (got ${file} and ${a}).`);
  }
  if (file === null) throw new UsageError(`No G-code file given. ${USAGE}`);
  if (material !== undefined && !isMaterialFamily(material)) {
    throw new UsageError(`Unknown material "${material}"; use one of: ${MATERIAL_FAMILIES.join(', ')}.`);
  }
  return { file, rulesPath, diameterMm, material, json };
}

async function loadRules(path: string): Promise<Rule[]> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (err) {
    throw new UsageError(`Cannot read the rules file ${path}: ${(err as Error).message}`);
  }
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (err) {
    throw new UsageError(`The rules file ${path} is not valid JSON: ${(err as Error).message}`);
  }
  const parsed = RulebookSchema.safeParse(data);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new UsageError(`The rules file ${path} is not a rulebook: ${issue.path.length ? `[${issue.path.join('.')}] ` : ''}${issue.message}`);
  }
  return parsed.data;
}

const fmt = (v: number | null | undefined, digits = 2, unit = ''): string =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : `${v.toFixed(digits)}${unit}`;

function duration(s: number | null): string {
  if (s === null || !Number.isFinite(s)) return '—';
  const t = Math.round(s);
  const h = Math.floor(t / 3600);
  const m = Math.floor((t % 3600) / 60);
  const sec = t % 60;
  return h > 0 ? `${h} h ${m} min ${sec} s` : m > 0 ? `${m} min ${sec} s` : `${sec} s`;
}

function textReport(r: EngineReport, rules: RuleResult[] | undefined): string {
  const out: string[] = [];
  const row = (k: string, v: string) => out.push(`  ${k.padEnd(26)} ${v}`);
  out.push(`Inspection of ${r.file.name ?? 'input'}${r.file.gzip ? ' (gzip)' : ''} — ${r.slicer.generator ?? `slicer: ${r.slicer.dialect}`}`);
  out.push('');
  out.push('Filament');
  row('length', `${fmt(r.filament.lengthMm, 1, ' mm')}  (all fed incl. start code: ${fmt(r.filament.totalLengthMm, 1, ' mm')})`);
  row('volume', fmt(r.filament.volumeMm3, 1, ' mm³'));
  row('mass', `${fmt(r.filament.massG, 2, ' g')}  (${r.filament.material}, ${r.filament.densityGcm3} g/cm³, ${r.filament.diameterMm} mm filament)`);
  out.push('Flow (commanded)');
  row('peak', `${fmt(r.flow.peakMm3s, 2, ' mm³/s')}${r.flow.peakLineNo ? ` (line ${r.flow.peakLineNo})` : ''}`);
  row('95th percentile (time)', fmt(r.flow.p95Mm3s, 2, ' mm³/s'));
  row('mean while extruding', fmt(r.flow.meanMm3s, 2, ' mm³/s'));
  out.push('Layers');
  row('count', String(r.layers.count));
  row('layer height', fmt(r.layers.heightMm, 3, ' mm'));
  row('first layer height', fmt(r.layers.firstHeightMm, 3, ' mm'));
  out.push('Geometry');
  row('size X × Y × Z', r.sizeMm ? `${fmt(r.sizeMm.x)} × ${fmt(r.sizeMm.y)} × ${fmt(r.sizeMm.z)} mm` : '—');
  row('objects', String(r.objects));
  out.push('Time');
  row('estimated', `${duration(r.time.estimatedS)}  (${fmt(r.time.estimatedS, 0, ' s')})`);
  row('slicer estimate', r.time.slicerEstimateS === null ? '—' : `${duration(r.time.slicerEstimateS)}  (${fmt(r.time.slicerEstimateS, 0, ' s')})`);
  row('length ÷ feed only', duration(r.time.commandedS));
  out.push('Overrides');
  row('speed factor (M220)', r.overrides.feedPercentMax === null ? 'none' : `${r.overrides.feedPercentMin}–${r.overrides.feedPercentMax} %`);
  row('flow factor (M221)', r.overrides.flowPercentMax === null ? 'none' : `${r.overrides.flowPercentMin}–${r.overrides.flowPercentMax} %`);
  if (r.features.length > 0) {
    out.push('Per feature                 width mm (mean)   speed mm/s min / mean / max');
    for (const f of r.features) {
      out.push(
        `  ${f.feature.padEnd(26)} ${fmt(f.lineWidthMm.mean, 3).padStart(8)}          ${fmt(f.speedMms.min, 0)} / ${fmt(f.speedMms.mean, 0)} / ${fmt(f.speedMms.max, 0)}`,
      );
    }
  }
  out.push('Settings                     declared     measured');
  for (const [k, v] of Object.entries(r.settings)) {
    const d = v.declared === null ? '—' : String(+v.declared.toFixed(3));
    const m = v.measured === null ? '—' : String(+v.measured.toFixed(3));
    out.push(`  ${k.padEnd(26)} ${d.padStart(8)}     ${m.padStart(8)}`);
  }
  if (rules) {
    out.push('Rules');
    for (const res of rules) out.push(`  [${res.status.toUpperCase()}] ${res.message}${res.rule.severity === 'advisory' ? ' (advisory)' : ''}`);
  }
  if (r.plausibility && r.plausibility.length > 0) {
    out.push('Plausibility');
    for (const f of r.plausibility) out.push(`  [${f.severity}] ${f.message}`);
  }
  out.push('Warnings');
  if (r.warnings.length === 0) out.push('  none');
  for (const w of r.warnings) out.push(`  [${w.severity}] ${w.message}`);
  return out.join('\n');
}

async function main(ctx: InspectionMainContext): Promise<number> {
  let args: CliArgs;
  let rules: Rule[] | undefined;
  try {
    args = parseArgs(process.argv.slice(2));
    if (args.rulesPath) rules = await loadRules(args.rulesPath);
  } catch (err) {
    process.stderr.write(`${firstLine((err as Error).message)}\n`);
    return 2;
  }
  ctx.subject = args.file;
  const report: EngineReport = await inspectFile(args.file, {
    filamentDiameterMm: args.diameterMm,
    material: args.material as (typeof MATERIAL_FAMILIES)[number] | undefined,
    rules,
  });
  if (args.json) process.stdout.write(`${JSON.stringify(toJsonReport(report))}\n`);
  else process.stdout.write(`${textReport(report, report.rules)}\n`);
  return 0;
}

void runInspectionMain(main);
