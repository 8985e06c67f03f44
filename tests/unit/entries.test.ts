import { describe, it, expect } from 'vitest';
import { parseClaimedTime, EntryDetailsSchema } from '@/lib/entries/schema';
import { classEligibility } from '@/lib/entries/eligibility';
import { currentGcodeOf } from '@/lib/entries/inspection';

describe('claimed time', () => {
  it('reads h:mm:ss.t and shorter forms', () => {
    // By hand: 0:24:31.4 = 24 × 60 + 31.4 = 1471.4 s.
    expect(parseClaimedTime('0:24:31.4')).toBe(1_471_400);
    expect(parseClaimedTime('24:31.4')).toBe(1_471_400);
    expect(parseClaimedTime('1:02:03')).toBe(3_723_000);
    expect(parseClaimedTime('59.96')).toBe(60_000);
    expect(parseClaimedTime('0:61:00')).toBeNull();
    expect(parseClaimedTime('fast')).toBeNull();
    expect(parseClaimedTime('0:00:00.0')).toBeNull();
  });
  it('the schema explains a bad time next to the field', () => {
    const r = EntryDetailsSchema.safeParse({ seasonId: 1, classId: 1, machineId: 1, materialFamily: 'pla', nozzleMm: 0.4, claimedTime: '25 minutes' });
    expect(r.success).toBe(false);
    expect(r.error!.issues.find((i) => i.path[0] === 'claimedTime')!.message).toMatch(/h:mm:ss\.t/);
  });
});

describe('class eligibility', () => {
  const machine = { nozzleMm: 0.4, motionSystem: 'corexy' as const, buildXMm: 180, buildYMm: 180, buildZMm: 180, isModified: true };
  const base = { nozzleDiametersMm: [] as number[], nozzleMinMm: null, materialFamilies: [] as string[], motionSystems: [] as never[], buildVolumeMinMm: null, buildVolumeMaxMm: null, modification: 'any' as const };
  it('checks nozzle, band, motion, material and modification', () => {
    expect(classEligibility({ ...base, nozzleDiametersMm: [0.4], buildVolumeMaxMm: 200 }, machine, 0.4, 'pla')).toEqual([]);
    expect(classEligibility({ ...base, nozzleMinMm: 0.6 }, machine, 0.4, 'pla')[0]).toMatch(/0\.6 mm or wider/);
    expect(classEligibility({ ...base, buildVolumeMaxMm: 150 }, machine, 0.4, 'pla')[0]).toMatch(/180 mm/);
    expect(classEligibility({ ...base, motionSystems: ['delta'] as never[] }, machine, 0.4, 'pla')[0]).toMatch(/Delta/);
    expect(classEligibility({ ...base, materialFamilies: ['petg'] }, machine, 0.4, 'pla')[0]).toMatch(/PETG/);
    expect(classEligibility({ ...base, modification: 'stock' }, machine, 0.4, 'pla')[0]).toMatch(/stock/);
  });
});

describe('current G-code', () => {
  it('is the newest G-code not replaced, whatever the order and the other kinds', () => {
    type Files = Parameters<typeof currentGcodeOf>[0];
    const f = (id: number, kind: string, replacedAt?: string) => ({ id, kind, meta: replacedAt ? { replacedAt } : {} });
    const files = [f(3, 'gcode'), f(1, 'gcode', '2026-11-01T10:00:00Z'), f(7, 'photo'), f(5, 'gcode'), f(6, 'gcode', '2026-11-02T10:00:00Z')] as unknown as Files;
    expect(currentGcodeOf(files)?.id).toBe(5);
    expect(currentGcodeOf([f(2, 'gcode', '2026-11-01T10:00:00Z'), f(4, 'project')] as unknown as Files)).toBeNull();
  });
});
