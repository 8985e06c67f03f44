/**
 * Time planner against closed-form constant-acceleration kinematics (v² = v0² + 2as, s = v·t for
 * cruise; any mechanics textbook) and the cornering rules of printer firmware.
 */
import { describe, expect, it } from 'vitest';
import { trapezoidTimeS } from '../../../lib/inspection/planner';
import { inspectBytes } from './engineHelpers';

const timeOf = async (gcode: string) => (await inspectBytes(gcode)).time.estimatedS;

/** Trapezoid move time from speed u to speed w with cruise v, acceleration a, length L (textbook, computed by hand here). */
function handTrapezoid(u: number, w: number, v: number, a: number, L: number): number {
  const dAcc = (v * v - u * u) / (2 * a);
  const dDec = (v * v - w * w) / (2 * a);
  return (v - u) / a + (v - w) / a + (L - dAcc - dDec) / v;
}

describe('trapezoid and triangle profiles', () => {
  it('a long move from rest to rest takes t = L/v + v/a (full trapezoid, constant-acceleration kinematics)', async () => {
    // L = 100 mm, v = 100 mm/s, a = 1000 mm/s²: 0.1 s up, 0.1 s down, 90 mm cruise → 1.1 s.
    expect(await timeOf('M204 S1000\nG1 X100 F6000')).toBeCloseTo(100 / 100 + 100 / 1000, 9);
    expect(trapezoidTimeS(0, 0, 100 * 100, 1000, 100)).toBeCloseTo(1.1, 12);
  });

  it('a short move never reaches cruise: triangle with t = 2·√(L/a) (peak v = √(aL))', async () => {
    expect(await timeOf('M204 S1000\nG1 X10 F60000')).toBeCloseTo(2 * Math.sqrt(10 / 1000), 9);
  });

  it('collinear moves join at full speed: two halves take as long as the whole', async () => {
    expect(await timeOf('M204 S1000\nG1 X50 F6000\nG1 X100')).toBeCloseTo(1.1, 9);
  });

  it('a thousand collinear 1 mm moves plan like one 1000 mm move (look-ahead reaches past the stopping distance)', async () => {
    const lines = ['M204 S1000', 'G91', 'G1 X1 F6000'];
    for (let i = 1; i < 1000; i++) lines.push('G1 X1');
    expect(await timeOf(lines.join('\n'))).toBeCloseTo(1000 / 100 + 100 / 1000, 6);
  });

  it('a reversal stops the machine in between', async () => {
    expect(await timeOf('M204 S1000\nG1 X100 F6000\nG1 X0')).toBeCloseTo(2.2, 9);
  });
});

describe('cornering', () => {
  it('junction deviation: v² = a·δ·sin(θ/2)/(1 − sin(θ/2)) at a 90° corner (grbl/Marlin JUNCTION_DEVIATION)', async () => {
    const a = 1000;
    const jd = 0.05;
    const s = Math.sin(Math.PI / 4);
    const vj = Math.sqrt((a * jd * s) / (1 - s));
    const expected = handTrapezoid(0, vj, 100, a, 100) + handTrapezoid(vj, 0, 100, a, 100);
    expect(await timeOf(`M204 S${a}\nM205 J${jd}\nG1 X100 F6000\nG1 Y100`)).toBeCloseTo(expected, 9);
  });

  it('Klipper square_corner_velocity is the speed through a 90° corner (Klipper kinematics docs)', async () => {
    const expected = handTrapezoid(0, 5, 100, 1000, 100) + handTrapezoid(5, 0, 100, 1000, 100);
    expect(await timeOf('SET_VELOCITY_LIMIT ACCEL=1000 SQUARE_CORNER_VELOCITY=5\nG1 X100 F6000\nG1 Y100')).toBeCloseTo(expected, 9);
  });

  it('classic jerk: no axis jumps by more than M205 X/Y, and moves start at the jerk speed (Marlin classic jerk)', async () => {
    // X drops from vj to 0 and Y rises from 0 to vj at the corner: vj = jerk = 10 mm/s; the file's
    // end is a full stop.
    const expected = handTrapezoid(10, 10, 100, 1000, 100) + handTrapezoid(10, 0, 100, 1000, 100);
    expect(await timeOf('M204 S1000\nM205 X10 Y10\nG1 X100 F6000\nG1 Y100')).toBeCloseTo(expected, 9);
  });
});

describe('limits, retracts and dwells', () => {
  it('M203 caps the axis feed', async () => {
    expect(await timeOf('M204 S1000\nM203 X50\nG1 X100 F6000')).toBeCloseTo(100 / 50 + 50 / 1000, 9);
  });

  it('M201 caps the acceleration of a move along that axis', async () => {
    expect(await timeOf('M204 S5000\nM201 X1000\nG1 X100 F6000')).toBeCloseTo(1.1, 9);
  });

  it('extruder-only retracts use the retract acceleration M204 R', async () => {
    // 5 mm at 50 mm/s with 1000 mm/s²: 5/50 + 50/1000.
    expect(await timeOf('M204 R1000\nM83\nG1 E-5 F3000')).toBeCloseTo(0.15, 9);
  });

  it('G4 P (ms) and S (s) add dwell time after the queue empties (RepRap wiki G4)', async () => {
    expect(await timeOf('M204 S1000\nG1 X100 F6000\nG4 P500\nG4 S2')).toBeCloseTo(1.1 + 0.5 + 2, 9);
  });

  it('M220 speeds the estimate up: the speed factor applies to the feed (Marlin M220)', async () => {
    expect(await timeOf('M204 S1000\nM220 S200\nG1 X100 F3000')).toBeCloseTo(1.1, 9);
  });
});
