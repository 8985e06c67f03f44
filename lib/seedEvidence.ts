/**
 * Evidence for the demo entries: each non-draft demo entry gets a real sliced G-code fixture of the
 * Beacon (tests/fixtures/gcode), two generated photos, a real inspection by the engine (through the
 * same job path uploads use), the judges' reviews that explain its state, and the final season's
 * standings are frozen. Runs after seedDemo; entries that already have a G-code are skipped.
 */
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import crypto from 'node:crypto';
import sharp from 'sharp';
import { Entry, Review, Season, StoredFile, User } from '@/models';
import { getSequelize } from '@/lib/db';
import { checkGcode, checkPhotos, FileWriter } from '@/lib/entries/files';
import { reinspect } from '@/lib/entries/inspection';
import { drainJobs } from '@/lib/jobs/start';
import { freezeStandings } from '@/lib/standings';
import type { UploadedFile } from '@/lib/uploads';
import type { ReasonCode } from '@/lib/reviews/reasons';

const FIXTURES = path.join(process.cwd(), 'tests', 'fixtures', 'gcode');

/** Which fixture each demo entry ran, by e-mail prefix, season and state (see lib/seed.ts). */
const EVIDENCE: { who: string; season: string; state: string; gcode: string; reasons?: ReasonCode[]; note?: string }[] = [
  { who: 'entrant', season: 'frostbite-sprint', state: 'verified', gcode: 'prusa-beacon-020.gcode.gz', reasons: ['evidence_consistent', 'quality_acceptable'] },
  { who: 'pim', season: 'frostbite-sprint', state: 'verified', gcode: 'cura-beacon-020.gcode.gz', reasons: ['evidence_consistent', 'quality_acceptable'] },
  { who: 'sasha', season: 'frostbite-sprint', state: 'submitted', gcode: 'slic3r-beacon-020.gcode.gz' },
  { who: 'judge2', season: 'frostbite-sprint', state: 'submitted', gcode: 'prusa-beacon-020-nocomments.gcode.gz' },
  { who: 'entrant', season: 'frostbite-sprint', state: 'returned', gcode: 'prusa-beacon-nozzle06-030.gcode.gz', reasons: ['rulebook_breach'], note: 'The file prints 20 % infill and 3 bottom layers; the rulebook asks for 15 % and 4. Re-slice and upload again.' },
  { who: 'pim', season: 'frostbite-sprint', state: 'rejected', gcode: 'prusa-beacon-028.gcode.gz', reasons: ['time_below_estimate', 'rulebook_breach'], note: 'Claimed time is under what the file allows, and it prints 3 walls at 25 % infill.' },
  { who: 'pim', season: 'leaf-fall-dash', state: 'verified', gcode: 'cura-beacon-020.gcode.gz', reasons: ['evidence_consistent'] },
  { who: 'entrant', season: 'leaf-fall-dash', state: 'verified', gcode: 'prusa-beacon-020.gcode.gz', reasons: ['evidence_consistent'] },
];

async function tmpCopy(dir: string, src: string, name: string): Promise<UploadedFile> {
  const tmpPath = path.join(dir, crypto.randomBytes(6).toString('hex'));
  await fsp.copyFile(src, tmpPath);
  const data = await fsp.readFile(tmpPath);
  return { field: 'gcode', tmpPath, originalName: name, declaredMime: 'application/octet-stream', sizeBytes: data.length, sha256: crypto.createHash('sha256').update(data).digest('hex') };
}

/** A plain generated "photo": the Beacon's outline on a bench, with a caption. Invented imagery. */
async function demoPhoto(dir: string, caption: string, hue: number): Promise<UploadedFile> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="960" height="720">
    <rect width="960" height="720" fill="hsl(${hue},12%,82%)"/>
    <rect x="0" y="560" width="960" height="160" fill="hsl(${hue},10%,62%)"/>
    <rect x="380" y="200" width="200" height="360" fill="#f25f0e"/>
    <rect x="430" y="300" width="100" height="90" fill="hsl(${hue},12%,82%)"/>
    <rect x="560" y="230" width="70" height="20" fill="#d74707"/>
    <text x="40" y="80" font-family="sans-serif" font-size="40" fill="#161b20">${caption}</text>
  </svg>`;
  const tmpPath = path.join(dir, crypto.randomBytes(6).toString('hex') + '.jpg');
  await sharp(Buffer.from(svg)).jpeg({ quality: 80 }).toFile(tmpPath);
  const data = await fsp.readFile(tmpPath);
  return { field: 'photos', tmpPath, originalName: `${caption.toLowerCase().replace(/\W+/g, '-')}.jpg`, declaredMime: 'image/jpeg', sizeBytes: data.length, sha256: crypto.createHash('sha256').update(data).digest('hex') };
}

export async function seedEvidence(opts: { log?: (s: string) => void } = {}) {
  const log = opts.log ?? (() => {});
  const judge = await User.findOne({ where: { email: 'judge@millbrook.example.org' } });
  const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'hotlap-seed-'));
  let done = 0;
  try {
    for (const ev of EVIDENCE) {
      const season = await Season.findOne({ where: { slug: ev.season } });
      const user = await User.findOne({ where: { email: `${ev.who}@millbrook.example.org` } });
      if (!season || !user) continue;
      const entry = await Entry.findOne({ where: { seasonId: season.id, entrantId: user.id, state: ev.state } });
      if (!entry || (await StoredFile.count({ where: { entryId: entry.id, kind: 'gcode' } }))) continue;
      const gcode = await checkGcode(await tmpCopy(dir, path.join(FIXTURES, ev.gcode), ev.gcode));
      const photos = await checkPhotos([await demoPhoto(dir, 'Beacon, front', 200), await demoPhoto(dir, 'Beacon, bridge window', 30)]);
      await getSequelize().transaction(async (transaction) => {
        const writer = new FileWriter(entry.id, user.id, transaction);
        await writer.gcode(gcode);
        for (const [i, p] of photos.entries()) await writer.photo(p, i);
        await entry.update({ gcodeSha256: gcode.file.sha256 }, { transaction });
        if (ev.reasons && judge && entry.submittedAt) {
          await Review.create(
            {
              entryId: entry.id,
              judgeId: judge.id,
              decision: ev.state === 'verified' ? 'verify' : ev.state === 'rejected' ? 'reject' : 'return',
              reasonCodes: ev.reasons,
              note: ev.note ?? '',
              createdAt: entry.decidedAt ?? new Date(),
            },
            { transaction },
          );
        }
      });
      await reinspect(entry);
      done++;
    }
    await drainJobs();
    const final = await Season.findOne({ where: { slug: 'leaf-fall-dash' } });
    if (final && done) await freezeStandings(final.id);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
  if (done) log(`Added G-code, photos, inspections and reviews to ${done} demo entries.`);
}
