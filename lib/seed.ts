/**
 * The invented demo scenario: the Millbrook Makers club runs the Frostbite Sprint season around its
 * Beacon test piece. Every person, club and machine here is made up; e-mail addresses use the
 * reserved example.org domain (RFC 2606). Running it twice changes nothing.
 */
import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';
import { ContestClass, Entry, Machine, Rule, Season, SeasonJudge, StoredFile, TestPiece, User, ExtrusionTest } from '@/models';
import { getSequelize } from '@/lib/db';
import { putBuffer } from '@/lib/storage';
import { hashPassword } from '@/lib/auth/password';
import { parseStl } from '@/lib/stl';
import { testPieceColumns } from '@/lib/seasons/testPieceColumns';
import { RuleSchema, ruleSentence, type Rule as RuleInput } from '@/lib/inspection/rules';
import type { Role, EntryState, MotionSystem } from '@/lib/domain';

export const DEMO_PASSWORD = 'hotlap-demo-2026';

export const DEMO_USERS: { key: string; name: string; email: string; roles: Role[] }[] = [
  { key: 'admin', name: 'Rowan Pike', email: 'admin@millbrook.example.org', roles: ['entrant', 'admin'] },
  { key: 'organizer', name: 'Maren Holt', email: 'organizer@millbrook.example.org', roles: ['entrant', 'organizer'] },
  { key: 'judge', name: 'Ilse Varga', email: 'judge@millbrook.example.org', roles: ['entrant', 'judge'] },
  { key: 'judge2', name: 'Tobin Reyes', email: 'judge2@millbrook.example.org', roles: ['entrant', 'judge'] },
  { key: 'entrant', name: 'Juno Calloway', email: 'entrant@millbrook.example.org', roles: ['entrant'] },
  { key: 'pim', name: 'Pim Okafor', email: 'pim@millbrook.example.org', roles: ['entrant'] },
  { key: 'sasha', name: 'Sasha Lindqvist', email: 'sasha@millbrook.example.org', roles: ['entrant'] },
];

const FROSTBITE_RULES: RuleInput[] = [
  { metric: 'infill_percent', comparator: 'eq', value: 15, tolerance: 2, severity: 'blocking' },
  { metric: 'walls', comparator: 'eq', value: 2, severity: 'blocking' },
  { metric: 'top_layers', comparator: 'eq', value: 4, severity: 'blocking' },
  { metric: 'bottom_layers', comparator: 'eq', value: 4, severity: 'blocking' },
  { metric: 'layer_height_mm', comparator: 'between', value: 0.2, valueMax: 0.3, severity: 'blocking' },
  { metric: 'objects', comparator: 'eq', value: 1, severity: 'blocking' },
  { metric: 'scale_percent', comparator: 'between', value: 99, valueMax: 101, severity: 'blocking' },
  { metric: 'feed_override_percent_max', comparator: 'lte', value: 100, severity: 'blocking' },
  { metric: 'flow_override_percent_max', comparator: 'lte', value: 100, severity: 'blocking' },
];

const MACHINES: { owner: string; name: string; motion: MotionSystem; build: [number, number, number]; nozzle: number; hotend: string; accel: number; mods: string }[] = [
  { owner: 'entrant', name: 'Quillwork 180', motion: 'corexy', build: [180, 180, 180], nozzle: 0.4, hotend: 'High-flow ceramic heater, 0.4 mm hardened nozzle', accel: 20000, mods: 'Lightweight X carriage, dual 5015 part-cooling fans' },
  { owner: 'entrant', name: 'Old Faithful', motion: 'cartesian', build: [220, 220, 250], nozzle: 0.6, hotend: 'Stock hotend, 0.6 mm brass nozzle', accel: 4000, mods: '' },
  { owner: 'pim', name: 'Harrier 300', motion: 'corexy', build: [300, 300, 300], nozzle: 0.4, hotend: 'Long melt-zone hotend', accel: 15000, mods: 'Input shaping tuned with an accelerometer' },
  { owner: 'sasha', name: 'Tripod Nine', motion: 'delta', build: [200, 200, 300], nozzle: 0.4, hotend: 'Volcano-style long block', accel: 12000, mods: 'Carbon arms' },
  { owner: 'judge2', name: 'Bench Mule', motion: 'corexy', build: [250, 250, 250], nozzle: 0.4, hotend: 'Stock', accel: 8000, mods: '' },
];

const day = (iso: string) => new Date(`${iso}T12:00:00Z`);

export async function seedDemo(opts: { log?: (s: string) => void } = {}) {
  const log = opts.log ?? (() => {});
  if (await Season.findOne({ where: { slug: 'frostbite-sprint' } })) {
    log('Demo data already present; nothing to do.');
    return;
  }
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  await getSequelize().transaction(async (transaction) => {
    const users: Record<string, User> = {};
    for (const u of DEMO_USERS) {
      const [row] = await User.findOrCreate({
        where: { email: u.email },
        defaults: { email: u.email, name: u.name, passwordHash, roles: u.roles, emailVerifiedAt: day('2026-10-01') },
        transaction,
      });
      users[u.key] = row;
    }

    const frost = await Season.create(
      {
        slug: 'frostbite-sprint',
        name: 'Frostbite Sprint',
        hostName: 'Millbrook Makers',
        description:
          'Print the Beacon as fast as your machine allows while keeping it clean: crisp bridge window, tidy overhang, true dimensions.\nTime runs from the first extrusion to the last.',
        state: 'open',
        opensAt: day('2026-11-15'),
        closesAt: day('2027-01-31'),
        timeZone: 'UTC',
        photosRequired: 2,
        videoRequired: true,
        entryLimit: 3,
        rulesFrozenAt: day('2026-11-20'),
        createdById: users.organizer.id,
      },
      { transaction },
    );
    const leaf = await Season.create(
      {
        slug: 'leaf-fall-dash',
        name: 'Leaf-fall Dash',
        hostName: 'Millbrook Makers',
        description: 'The club’s warm-up season on the Beacon. Standings are final.',
        state: 'final',
        opensAt: day('2026-09-01'),
        closesAt: day('2026-10-15'),
        createdById: users.organizer.id,
        rulesFrozenAt: day('2026-09-05'),
      },
      { transaction },
    );

    // The Beacon: our own test piece, generated by scripts/fixtures/make-stl.ts.
    const stlPath = path.join(process.cwd(), 'tests', 'fixtures', 'stl', 'beacon.stl');
    const stlBytes = fs.readFileSync(stlPath);
    const stl = parseStl(stlBytes);
    for (const season of [frost, leaf]) {
      const key = `test-pieces/${season.slug}-beacon.stl`;
      await putBuffer(key, stlBytes, { contentType: 'model/stl' });
      const file = await StoredFile.create(
        {
          ownerId: users.organizer.id,
          entryId: null,
          kind: 'test_piece',
          originalName: 'beacon.stl',
          mime: 'model/stl',
          sizeBytes: stlBytes.length,
          sha256: crypto.createHash('sha256').update(stlBytes).digest('hex'),
          storageKey: key,
        },
        { transaction },
      );
      await TestPiece.create({ seasonId: season.id, storedFileId: file.id, name: 'Beacon', ...testPieceColumns(stl) }, { transaction });
    }

    const classes: Record<string, ContestClass> = {};
    for (const season of [frost, leaf]) {
      const defs = [
        { slug: 'compact-04', name: 'Compact · 0.4 mm', description: 'Machines whose longest build axis is at most 200 mm, 0.4 mm nozzle.', nozzleDiametersMm: [0.4], buildVolumeMaxMm: 200 },
        { slug: 'open-04', name: 'Open · 0.4 mm', description: 'Any machine with a 0.4 mm nozzle.', nozzleDiametersMm: [0.4], buildVolumeMaxMm: null },
        { slug: 'wide-06', name: 'Wide nozzle · 0.6 mm+', description: 'Nozzles of 0.6 mm and wider.', nozzleDiametersMm: [], nozzleMinMm: 0.6, buildVolumeMaxMm: null },
      ];
      for (const [i, d] of defs.entries()) {
        const c = await ContestClass.create(
          { seasonId: season.id, slug: d.slug, name: d.name, description: d.description, nozzleDiametersMm: d.nozzleDiametersMm, nozzleMinMm: d.nozzleMinMm ?? null, buildVolumeMinMm: null, buildVolumeMaxMm: d.buildVolumeMaxMm, displayOrder: i },
          { transaction },
        );
        classes[`${season.slug}/${d.slug}`] = c;
      }
      for (const [i, r] of FROSTBITE_RULES.entries()) {
        const rule = RuleSchema.parse(r);
        await Rule.create(
          { seasonId: season.id, classId: null, metric: rule.metric, comparator: rule.comparator, value: rule.value, valueMax: rule.valueMax ?? null, tolerance: rule.tolerance ?? 0, severity: rule.severity, sentence: ruleSentence(rule), position: i },
          { transaction },
        );
      }
    }

    await SeasonJudge.bulkCreate(
      [
        { seasonId: frost.id, userId: users.judge.id, appointedById: users.organizer.id },
        { seasonId: frost.id, userId: users.judge2.id, appointedById: users.organizer.id },
        { seasonId: leaf.id, userId: users.judge.id, appointedById: users.organizer.id },
      ],
      { transaction },
    );

    const machines: Record<string, Machine> = {};
    for (const m of MACHINES) {
      machines[m.name] = await Machine.create(
        {
          ownerId: users[m.owner].id, name: m.name, motionSystem: m.motion, buildXMm: m.build[0], buildYMm: m.build[1], buildZMm: m.build[2],
          nozzleMm: m.nozzle, hotend: m.hotend, extruder: 'Direct drive, dual gear', firmware: 'Open-source firmware with input shaping',
          maxAccelMmS2: m.accel, maxSpeedMms: 500, modifications: m.mods, isModified: m.mods !== '', retiredAt: null,
        },
        { transaction },
      );
    }
    // A weighed extrusion-limit test: 100 mm of 1.75 mm PLA weighs 0.298 g unextruded (2.405 mm² × 100 mm × 1.24 g/cm³).
    await ExtrusionTest.create(
      {
        machineId: machines['Quillwork 180'].id, materialFamily: 'pla', materialName: 'Club grey PLA', filamentDiameterMm: 1.75,
        sampleLengthMm: 100, referenceMassG: 0.298, thresholdPercent: 98,
        steps: [
          { rateMm3s: 15, massG: 0.298 }, { rateMm3s: 20, massG: 0.297 }, { rateMm3s: 25, massG: 0.296 },
          { rateMm3s: 30, massG: 0.293 }, { rateMm3s: 35, massG: 0.284 }, { rateMm3s: 40, massG: 0.268 },
        ],
        limitFlowMm3s: 30, testedAt: day('2026-11-10'),
      },
      { transaction },
    );

    const entries: { season: Season; cls: string; who: string; machine: string; state: EntryState; timeMs: number; submitted: string | null; nozzle?: number }[] = [
      { season: frost, cls: 'compact-04', who: 'entrant', machine: 'Quillwork 180', state: 'verified', timeMs: 1_562_300, submitted: '2026-11-21' },
      { season: frost, cls: 'open-04', who: 'pim', machine: 'Harrier 300', state: 'verified', timeMs: 1_498_700, submitted: '2026-11-22' },
      { season: frost, cls: 'open-04', who: 'sasha', machine: 'Tripod Nine', state: 'submitted', timeMs: 1_611_000, submitted: '2026-11-25' },
      { season: frost, cls: 'open-04', who: 'judge2', machine: 'Bench Mule', state: 'submitted', timeMs: 1_702_400, submitted: '2026-11-26' },
      { season: frost, cls: 'wide-06', who: 'entrant', machine: 'Old Faithful', state: 'returned', timeMs: 1_388_900, submitted: '2026-11-23', nozzle: 0.6 },
      { season: frost, cls: 'open-04', who: 'pim', machine: 'Harrier 300', state: 'rejected', timeMs: 1_104_000, submitted: '2026-11-18' },
      { season: frost, cls: 'compact-04', who: 'entrant', machine: 'Quillwork 180', state: 'draft', timeMs: 1_530_000, submitted: null },
      { season: leaf, cls: 'open-04', who: 'pim', machine: 'Harrier 300', state: 'verified', timeMs: 1_655_100, submitted: '2026-09-20' },
      { season: leaf, cls: 'compact-04', who: 'entrant', machine: 'Quillwork 180', state: 'verified', timeMs: 1_701_800, submitted: '2026-09-22' },
    ];
    for (const e of entries) {
      await Entry.create(
        {
          seasonId: e.season.id, classId: classes[`${e.season.slug}/${e.cls}`].id, entrantId: users[e.who].id, machineId: machines[e.machine].id,
          materialFamily: 'pla', materialName: 'Club grey PLA', nozzleMm: e.nozzle ?? 0.4, claimedTimeMs: e.timeMs,
          evidenceUrl: 'https://video.example.org/run', measuredXMm: stl.sizeMm.x, measuredYMm: stl.sizeMm.y, measuredZMm: stl.sizeMm.z,
          state: e.state, gcodeSha256: null, submittedAt: e.submitted ? day(e.submitted) : null,
          decidedAt: ['verified', 'rejected', 'returned'].includes(e.state) && e.submitted ? new Date(day(e.submitted).getTime() + 86400_000) : null,
        },
        { transaction },
      );
    }
  });
  log(`Seeded the demo: ${DEMO_USERS.length} accounts (password "${DEMO_PASSWORD}"), 2 seasons, 6 classes, 5 machines, 9 entries.`);
}
