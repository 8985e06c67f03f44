/**
 * Parser semantics against the NIST RS274NGC interpreter report (NISTIR 6556, Kramer, Proctor &
 * Messina 2000) and the RepRap wiki / Marlin G-code references. Section names beside each assertion.
 */
import { describe, expect, it } from 'vitest';
import { featureFromLabel } from '../../../lib/inspection/parser';
import { parse, sum } from './engineHelpers';

const len = (segs: { lengthMm: number }[]) => sum(segs.map((s) => s.lengthMm));

describe('distance modes and units', () => {
  it('G90 absolute / G91 relative (NISTIR 6556 §3.5.16 distance mode)', () => {
    const abs = parse('G90\nG1 X10 F600\nG1 X10\nG1 X25');
    expect(abs.segments.map((s) => s.x1)).toEqual([10, 25]); // second X10 is no move
    const rel = parse('G91\nG1 X10 F600\nG1 X10\nG1 X-5');
    expect(rel.segments.map((s) => s.x1)).toEqual([10, 20, 15]);
  });

  it('G20 inch units scale coordinates and feed (NISTIR 6556 §3.5.11 length units)', () => {
    const p = parse('G20\nG1 X1 Y2 F60');
    expect(p.segments[0].x1).toBeCloseTo(25.4, 9);
    expect(p.segments[0].y1).toBeCloseTo(50.8, 9);
    // F60 in/min = 60 × 25.4 mm / 60 s = 25.4 mm/s
    expect(p.segments[0].feedMms).toBeCloseTo(25.4, 9);
    const back = parse('G20\nG1 X1 F60\nG21\nG1 X30');
    expect(back.segments[1].x1).toBe(30);
  });

  it('axis words alone repeat the modal motion (NISTIR 6556 §3.5.1 motion mode is modal)', () => {
    const p = parse('G1 X1 F600\nX2\nY3');
    expect(p.segments.map((s) => [s.x1, s.y1])).toEqual([
      [1, 0],
      [2, 0],
      [2, 3],
    ]);
  });

  it('units are set before motion on the same line (NISTIR 6556 §3.8 order of execution)', () => {
    const p = parse('G1 G20 X1 F60');
    expect(p.segments[0].x1).toBeCloseTo(25.4, 9);
  });
});

describe('arcs', () => {
  it('a full circle G2 with I/J has length 2πr within the chord tolerance (NISTIR 6556 §3.5.3.1 center format)', () => {
    const r = 10;
    const p = parse('G1 X10 Y0 F600\nG2 X10 Y0 I-10 J0', { arcToleranceMm: 0.01 });
    const arc = p.segments.slice(1);
    const theta = 2 * Math.acos(1 - 0.01 / r);
    // Chords are shorter than the arc by at most 2πr·θ²/24 (series of 2r·sin(θ/2)).
    const bound = 2 * Math.PI * r * ((theta * theta) / 24) + 1e-9;
    expect(Math.abs(len(arc) - 2 * Math.PI * r)).toBeLessThanOrEqual(bound);
    // Every chord's midpoint stays within the tolerance of the circle (sagitta bound).
    for (const s of arc) {
      const mx = (s.x0 + s.x1) / 2;
      const my = (s.y0 + s.y1) / 2;
      expect(r - Math.hypot(mx, my)).toBeLessThanOrEqual(0.01 + 1e-9);
    }
    expect(arc[arc.length - 1].x1).toBe(10);
    expect(arc[arc.length - 1].y1).toBe(0);
  });

  it('R-form quarter arc, clockwise, centre on the right (NISTIR 6556 §3.5.3.2 radius format)', () => {
    const p = parse('G1 X0 Y10 F600\nG2 X10 Y0 R10');
    const arc = p.segments.slice(1);
    expect(len(arc)).toBeCloseTo((2 * Math.PI * 10) / 4, 2);
    for (const s of arc) expect(Math.hypot(s.x1, s.y1)).toBeCloseTo(10, 6); // centre (0,0)
    expect(arc[0].x1).toBeGreaterThan(0); // clockwise from 12 o'clock heads to +X
    // Negative R takes the arc of more than 180° (same section): three quarters.
    const big = parse('G1 X0 Y10 F600\nG2 X10 Y0 R-10');
    expect(len(big.segments.slice(1))).toBeCloseTo((3 * 2 * Math.PI * 10) / 4, 1);
  });

  it('G3 turns counter-clockwise, G2 clockwise (NISTIR 6556 §3.5.3)', () => {
    const ccw = parse('G1 X10 Y0 F600\nG3 X0 Y10 I-10 J0');
    expect(len(ccw.segments.slice(1))).toBeCloseTo(Math.PI * 5, 2); // quarter
    const cw = parse('G1 X10 Y0 F600\nG2 X0 Y10 I-10 J0');
    expect(len(cw.segments.slice(1))).toBeCloseTo(Math.PI * 15, 1); // three quarters
  });

  it('helical arcs spread Z and E evenly along the arc (NISTIR 6556 §3.5.3 helical motion)', () => {
    const p = parse('M83\nG1 X10 Y0 Z0 F600\nG2 X10 Y0 Z2 I-10 J0 E6.2832');
    const arc = p.segments.slice(1);
    expect(arc[arc.length - 1].z1).toBeCloseTo(2, 9);
    expect(sum(arc.map((s) => s.eMm))).toBeCloseTo(6.2832, 9);
    const mid = arc[Math.floor(arc.length / 2) - 1];
    expect(mid.z1).toBeCloseTo(1, 1);
  });

  it('a bad arc is measured as a line with a warning, never NaN', () => {
    const p = parse('G1 X0 Y0 F600\nG2 X50 Y0 R1\nG2 X60 Y0');
    expect(p.segments.every((s) => Number.isFinite(s.lengthMm))).toBe(true);
    expect(p.parser.warnings.map((w) => w.code)).toContain('bad-arc');
  });
});

describe('extrusion modes and offsets', () => {
  it('M82 absolute and M83 relative extrusion (RepRap wiki M82, M83)', () => {
    const a = parse('M82\nG1 X1 E1 F600\nG1 X2 E3');
    expect(a.segments.map((s) => s.eMm)).toEqual([1, 2]);
    const r = parse('M83\nG1 X1 E1 F600\nG1 X2 E3');
    expect(r.segments.map((s) => s.eMm)).toEqual([1, 3]);
  });

  it('G92 E0 resets the extruder position without feeding (RepRap wiki G92)', () => {
    const p = parse('M82\nG1 X1 E5 F600\nG92 E0\nG1 X2 E1');
    expect(p.segments.map((s) => s.eMm)).toEqual([5, 1]);
  });

  it('G92 on an axis shifts the coordinate system, not the machine (RepRap wiki G92)', () => {
    const p = parse('G1 X10 F600\nG92 X0\nG1 X5');
    expect(p.segments[1].x0).toBe(10);
    expect(p.segments[1].x1).toBe(15);
    expect(p.segments[1].lengthMm).toBe(5);
  });

  it('G91 makes E relative as well (Marlin G91 reference: all axes, E included)', () => {
    const p = parse('M82\nG91\nG1 X1 E1 F600\nG1 X1 E1');
    expect(p.segments.map((s) => s.eMm)).toEqual([1, 1]);
  });

  it('G28 homes the named axes to 0 and clears their offsets (Marlin G28)', () => {
    const p = parse('G1 X10 Y10 F600\nG92 X0\nG28 X\nG1 X5 Y10');
    expect(p.segments[1].x0).toBe(0);
    expect(p.segments[1].x1).toBe(5);
    expect(p.segments[1].y0).toBe(10);
  });

  it('G10/G11 firmware retraction use M207/M208 lengths (RepRap wiki G10 retract, Marlin M207/M208)', () => {
    const p = parse('M207 S2 F1800\nM208 S0.1 F600\nG10\nG10\nG11');
    expect(p.segments.map((s) => s.eMm)).toEqual([-2, 2.1]); // a repeated G10 does nothing
    expect(p.segments[0].feedMms).toBe(30);
    expect(p.segments[1].feedMms).toBe(10);
    expect(p.segments.every((s) => !s.extruding)).toBe(true);
  });

  it('G10 with L/P is coordinate data, not a retraction (NISTIR 6556 §3.5.5 G10 L2)', () => {
    expect(parse('G10 L2 P1 X0').segments).toHaveLength(0);
  });

  it('M220 scales feed, M221 scales extrusion per tool, both are recorded (Marlin M220, M221)', () => {
    const p = parse('M83\nM220 S50\nG1 X10 F6000\nM221 S90\nG1 X20 E1\nT1\nM221 T0 S110\nG1 X30 E1\nM220 S100\nT0\nG1 X40 E1');
    expect(p.segments[0].feedMms).toBe(50);
    expect(p.segments[1].eMm).toBeCloseTo(0.9, 12); // M221 without T: the active tool (T0)
    expect(p.segments[2].eMm).toBe(1); // T1 has its own factor, still 100 %
    expect(p.segments[2].tool).toBe(1);
    expect(p.segments[3].eMm).toBeCloseTo(1.1, 12); // M221 T0 S110 changed T0 while T1 was active
    const st = p.parser.stats;
    expect(st.speedFactor.max).toEqual({ percent: 100, lineNo: 9 });
    expect(st.speedFactor.min).toEqual({ percent: 50, lineNo: 2 });
    expect(st.flowFactor.max?.percent).toBe(110);
  });

  it('an E-only move is a retract, not a printing move', () => {
    const p = parse('M83\nG1 E-0.8 F2400');
    expect(p.segments[0]).toMatchObject({ lengthMm: 0, eMm: -0.8, extruding: false, feedMms: 40 });
  });
});

describe('line syntax', () => {
  it('strips N line numbers and verifies *checksums (RepRap wiki "N" and "Checking")', () => {
    const body = 'N10 G1 X1 F600';
    let cs = 0;
    for (const ch of body) cs ^= ch.charCodeAt(0);
    const ok = parse(`${body}*${cs}`);
    expect(ok.segments[0].x1).toBe(1);
    expect(ok.parser.stats.checksumErrors).toBe(0);
    const bad = parse(`${body}*${(cs + 1) & 0xff}`);
    expect(bad.parser.stats.checksumErrors).toBe(1);
    expect(bad.parser.warnings[0].code).toBe('checksum');
  });

  it('reads ; and ( ) comments, any case, and words without spaces', () => {
    const p = parse('G1 X1 F600 ; move\nG1 (inline) X2\ng1 x3 y4\nG1X5Y6E0.5');
    expect(p.segments.map((s) => [s.x1, s.y1])).toEqual([
      [1, 0],
      [2, 0],
      [3, 4],
      [5, 6],
    ]);
    expect(p.segments[3].eMm).toBe(0.5); // Marlin reads "X5Y6E0.5" as X5 Y6 E0.5, not 6e0.5
  });

  it('a CR inside a line is a line break (lone-CR files); CRLF ends a line once', () => {
    const p = parse('G1 X1 F600\rG1 X2\r\nG1 X3\r\n');
    expect(p.segments.map((s) => s.x1)).toEqual([1, 2, 3]);
    expect(p.segments.map((s) => s.lineNo)).toEqual([1, 2, 3]);
  });

  it('skips free text after M117', () => {
    const p = parse('M117 X99 printing\nG1 X1 F600');
    expect(p.segments).toHaveLength(1);
  });
});

describe('machine limits', () => {
  it('reads M204 P/R/T and S, M205 X/Y/J, M201, M203 (Marlin references)', () => {
    const m = parse('M204 S1500\nM204 P2000 R3000 T4000\nM205 X8 Y9 J0.02\nM201 X5000 Y6000 Z100 E9000\nM203 X300 Y310 Z12 E60').machine;
    expect([m.accelPrintMms2, m.accelRetractMms2, m.accelTravelMms2]).toEqual([2000, 3000, 4000]);
    expect([m.jerkXMms, m.jerkYMms, m.junctionDeviationMm]).toEqual([8, 9, 0.02]);
    expect([m.maxAccelXMms2, m.maxAccelYMms2, m.maxAccelZMms2, m.maxAccelEMms2]).toEqual([5000, 6000, 100, 9000]);
    expect([m.maxFeedXMms, m.maxFeedYMms, m.maxFeedZMms, m.maxFeedEMms]).toEqual([300, 310, 12, 60]);
  });

  it('reads Klipper SET_VELOCITY_LIMIT (Klipper G-code reference)', () => {
    const m = parse('SET_VELOCITY_LIMIT VELOCITY=400 ACCEL=7000 ACCEL_TO_DECEL=3500 SQUARE_CORNER_VELOCITY=8 MINIMUM_CRUISE_RATIO=0.4').machine;
    expect(m.maxVelocityMms).toBe(400);
    expect(m.accelPrintMms2).toBe(7000);
    expect(m.accelToDecelMms2).toBe(3500);
    expect(m.squareCornerVelocityMms).toBe(8);
    expect(m.minimumCruiseRatio).toBe(0.4);
  });

  it('records temperatures, fans and tools', () => {
    const st = parse('M104 S215\nM109 S220\nM140 S60\nM190 S65\nM106 S255\nM107\nT1\nT0').parser.stats;
    expect(st.nozzleTempMaxC).toBe(220);
    expect(st.bedTempMaxC).toBe(65);
    expect(st.fanMaxPercent).toBeCloseTo(100, 6);
    expect([...st.toolsUsed].sort()).toEqual([0, 1]);
  });
});

describe('feature labels', () => {
  it('maps PrusaSlicer and CuraEngine ;TYPE: labels (as written by the fixture slicers)', () => {
    expect(featureFromLabel('External perimeter')).toBe('outer-wall');
    expect(featureFromLabel('Perimeter')).toBe('inner-wall');
    expect(featureFromLabel('Internal infill')).toBe('sparse-infill');
    expect(featureFromLabel('Solid infill')).toBe('solid-infill');
    expect(featureFromLabel('Top solid infill')).toBe('top-solid');
    expect(featureFromLabel('Bridge infill')).toBe('bridge');
    expect(featureFromLabel('Skirt/Brim')).toBe('skirt');
    expect(featureFromLabel('Custom')).toBeNull();
    expect(featureFromLabel('WALL-OUTER')).toBe('outer-wall');
    expect(featureFromLabel('WALL-INNER')).toBe('inner-wall');
    expect(featureFromLabel('FILL')).toBe('sparse-infill');
    expect(featureFromLabel('SKIN')).toBe('solid-infill');
    expect(featureFromLabel('SKIRT')).toBe('skirt');
    expect(featureFromLabel('SUPPORT')).toBe('support');
  });

  it('labels following moves, and reads Slic3r verbose per-move comments', () => {
    const p = parse('M83\n;TYPE:External perimeter\nG1 X1 E0.1 F600\n;TYPE:Internal infill\nG1 X2 E0.1');
    expect(p.segments.map((s) => s.feature)).toEqual(['outer-wall', 'sparse-infill']);
    // As written by Slic3r 1.3.0 with --gcode-comments (fixture slic3r-cylinder-025).
    const v = parse('M83\nG1 X1 E0.1 F600 ; perimeter\nG1 X2 E0.1 ; skirt\nG1 X3 E0.1 ; infill (bridge)\nG1 X4 E0.1 ; infill');
    expect(v.segments.map((s) => s.feature)).toEqual(['inner-wall', 'skirt', 'bridge', 'sparse-infill']);
  });

  it('reads ;FEATURE: labels (the spelling some slicers use instead of ;TYPE:)', () => {
    const p = parse('M83\n;FEATURE: Outer wall\nG1 X1 E0.1 F600\n;FEATURE:Sparse infill\nG1 X2 E0.1\n;FEATUREX:Inner wall\nG1 X3 E0.1');
    expect(p.segments.map((s) => s.feature)).toEqual(['outer-wall', 'sparse-infill', 'sparse-infill']);
    expect(p.parser.stats.featureLabels).toBe(2);
  });
});

describe('numbers', () => {
  it('decimals parse to the same double as ECMAScript Number() (correctly rounded, ECMA-262 §7.1.4.1.1)', () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) & 0x7fffffff) / 0x7fffffff);
    const texts: string[] = [];
    for (let k = 0; k < 2000; k++) {
      const digits = 1 + Math.floor(rnd() * 6);
      texts.push(`${rnd() < 0.3 ? '-' : ''}${Math.floor(rnd() * 400)}.${String(Math.floor(rnd() * 10 ** digits)).padStart(digits, '0')}`);
    }
    texts.push('0.1', '0.2', '0.3', '123.456', '.5', '5.', '-0.025', '199.99999');
    // Nine digits and more (the scanner's int32 part ends at nine): up to 15 significant digits.
    texts.push('123.456789', '1234.56789', '12345.6789012', '99999.9999999', '-0.000012345678', '1.00000000001', '0.123456789012345', '76543.2109876543');
    const p = parse(texts.map((t) => `G1 X${t} F600`).join('\n'));
    const xs = p.segments.map((s) => s.x1);
    // Consecutive equal values make no move; compare the distinct run.
    const expected = texts.map(Number).filter((v, i, a) => i === 0 ? v !== 0 : v !== a[i - 1]);
    expect(xs).toEqual(expected);
  });
});

describe('bad words', () => {
  it('malformed numbers warn with the line number and drop only that word', () => {
    const p = parse('G1 X1.2.3 Y5 F600\nG1 X--5 Y6\nG1 Xabc Y7');
    expect(p.segments.map((s) => [s.x1, s.y1])).toEqual([
      [0, 5],
      [0, 6],
      [0, 7],
    ]);
    const codes = p.parser.warnings.map((w) => [w.code, w.lineNo]);
    expect(codes).toEqual([
      ['malformed-number', 1],
      ['malformed-number', 2],
      ['malformed-number', 3],
    ]);
  });

  it('absurd values (negative or huge feed, 1e308, NaN) are ignored with a warning', () => {
    const p = parse('G1 X1 F600\nG1 X2 F-100\nG1 X3 F1e308\nG1 X1e308\nG1 XNaN');
    expect(p.segments.map((s) => s.feedMms)).toEqual([10, 10, 10]);
    expect(p.segments.map((s) => s.x1)).toEqual([1, 2, 3]);
    expect(p.parser.warnings.filter((w) => w.code === 'absurd-value').map((w) => w.lineNo)).toEqual([2, 3, 4]);
    expect(p.parser.warnings.some((w) => w.lineNo === 5)).toBe(true);
  });

  it('unknown commands are counted, not fatal', () => {
    const p = parse('M999\nG123\nPRINT_START BED=60\nM999\nEXCLUDE_OBJECT_START NAME=part_1\nG1 X1 F600');
    expect(p.segments).toHaveLength(1);
    expect(p.parser.stats.unknownCommands.get('M999')).toBe(2);
    expect(p.parser.stats.unknownCommands.get('G123')).toBe(1);
    expect(p.parser.stats.unknownCommands.get('PRINT_START')).toBe(1);
    expect(p.parser.stats.unknownCommandCount).toBe(4);
  });

  it('words with no command are ignored with a warning; axis words alone repeat the motion mode (NISTIR 6556 §3.5.1)', () => {
    const p = parse('X5 Y5\nG1 X1 F600\nX2\nQ77\nS255 P1\nN10 *93\n');
    expect(p.segments.map((s) => s.x1)).toEqual([1, 2]);
    expect(p.parser.warnings.filter((w) => w.code === 'no-command').map((w) => [w.lineNo, w.message])).toEqual([
      [1, 'Line 1: words XY without a G, M or T command (or a motion mode to repeat); ignored.'],
      [4, 'Line 4: word Q without a G, M or T command (or a motion mode to repeat); ignored.'],
      [5, 'Line 5: words PS without a G, M or T command (or a motion mode to repeat); ignored.'],
    ]);
  });
});
