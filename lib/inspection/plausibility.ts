/**
 * Plausibility checks: does an entrant's claim (time, machine, measured part) fit the G-code?
 * Each check compares a figure from the inspection report with a figure the entrant or the season
 * supplies, and produces a Flag whose code comes from FLAG_CODES (the one list of flag codes).
 */
import type { Flag } from './types';

/** The one list of flag codes the inspection engine emits, with the severity each carries. */
export const FLAG_CODES = {
  claimed_time_below_estimate: { severity: 'blocking', label: 'Claimed time shorter than the file allows' },
  mean_flow_above_machine_limit: { severity: 'blocking', label: 'Mean flow implied by the claimed time above the machine limit' },
  peak_flow_above_machine_limit: { severity: 'advisory', label: 'Peak commanded flow above the machine limit' },
  dimensions_off_test_piece: { severity: 'blocking', label: 'Measured part dimensions differ from the test piece' },
  scale_off_test_piece: { severity: 'blocking', label: 'G-code size differs from the test piece (scaled)' },
  duplicate_gcode: { severity: 'blocking', label: 'Same G-code already used by another entry' },
  settings_mismatch_infill: { severity: 'advisory', label: 'Declared infill differs from the toolpaths' },
  settings_mismatch_walls: { severity: 'advisory', label: 'Declared wall count differs from the toolpaths' },
  settings_mismatch_top_layers: { severity: 'advisory', label: 'Declared top layers differ from the toolpaths' },
  settings_mismatch_bottom_layers: { severity: 'advisory', label: 'Declared bottom layers differ from the toolpaths' },
  settings_mismatch_layer_height: { severity: 'advisory', label: 'Declared layer height differs from the toolpaths' },
  settings_mismatch_nozzle: { severity: 'info', label: 'Declared nozzle differs from the line width the toolpaths show' },
  missing_estimate: { severity: 'info', label: 'A check needed a figure the file did not give' },
} as const satisfies Record<string, { severity: Flag['severity']; label: string }>;

export type FlagCode = keyof typeof FLAG_CODES;

export function makeFlag(code: FlagCode, message: string): Flag {
  return { code, severity: FLAG_CODES[code].severity, message };
}

export interface SizeMm {
  x: number;
  y: number;
  z: number;
}

/** What the checks read from the inspection report (structural, so any report shape with these fields fits). */
export interface PlausibilityReport {
  time?: { estimated_s: number | null } | null;
  flow?: { peak_mm3s: number | null } | null;
  filament?: { volume_mm3: number | null } | null;
  size_mm?: SizeMm | null;
}

export interface PlausibilityClaims {
  claimedTimeMs?: number;
  machineFlowLimitMm3s?: number;
  measuredDimensionsMm?: SizeMm;
  testPieceSizeMm?: SizeMm;
  /** Allowed deviation for size and scale checks, percent (default 1). */
  scaleTolerancePercent?: number;
  /** Entry id of another entrant that uploaded the same G-code (by hash), when the caller found one. */
  duplicateOfEntry?: string;
}

export const DEFAULT_SCALE_TOLERANCE_PERCENT = 1;

const AXES = ['x', 'y', 'z'] as const;

function fmt(v: number, digits = 1): string {
  return v.toFixed(digits);
}

function fmtDurationS(s: number): string {
  const total = Math.round(s);
  const m = Math.floor(total / 60);
  const sec = total % 60;
  return m > 0 ? `${m} min ${sec} s` : `${sec} s`;
}

/**
 * Axis-by-axis deviation of a size from a reference, in mm and percent of the reference.
 * Axes are compared as given (the part is measured in its printed orientation).
 */
export function sizeDeviations(actual: SizeMm, reference: SizeMm): { axis: 'x' | 'y' | 'z'; deltaMm: number; percent: number }[] {
  return AXES.map((axis) => {
    const deltaMm = actual[axis] - reference[axis];
    const percent = reference[axis] > 0 ? (deltaMm / reference[axis]) * 100 : Number.POSITIVE_INFINITY;
    return { axis, deltaMm, percent };
  });
}

/** Scale of a size against a reference, percent (mean of the three axis ratios). */
export function scalePercent(actual: SizeMm, reference: SizeMm): number | null {
  const ratios = AXES.filter((a) => reference[a] > 0).map((a) => actual[a] / reference[a]);
  if (ratios.length === 0) return null;
  return (ratios.reduce((s, r) => s + r, 0) / ratios.length) * 100;
}

export function checkPlausibility(report: PlausibilityReport, claims: PlausibilityClaims): Flag[] {
  const flags: Flag[] = [];
  const tolPct = claims.scaleTolerancePercent ?? DEFAULT_SCALE_TOLERANCE_PERCENT;
  const estimatedS = report.time?.estimated_s ?? null;
  const volumeMm3 = report.filament?.volume_mm3 ?? null;
  const peakMm3s = report.flow?.peak_mm3s ?? null;

  if (claims.claimedTimeMs !== undefined) {
    const claimedS = claims.claimedTimeMs / 1000;
    if (!(claimedS > 0)) {
      flags.push(makeFlag('claimed_time_below_estimate', `The claimed time (${claims.claimedTimeMs} ms) is not a positive duration; enter the measured print time.`));
    } else if (estimatedS === null) {
      flags.push(makeFlag('missing_estimate', 'The claimed time could not be checked: the G-code gave no time estimate.'));
    } else if (claimedS < estimatedS) {
      const shortS = estimatedS - claimedS;
      flags.push(
        makeFlag(
          'claimed_time_below_estimate',
          `The claimed time ${fmtDurationS(claimedS)} is ${fmtDurationS(shortS)} (${fmt((shortS / estimatedS) * 100)} %) shorter than the ${fmtDurationS(estimatedS)} this G-code needs at its commanded speeds and accelerations. Check the timing or the uploaded file.`,
        ),
      );
    }

    if (claims.machineFlowLimitMm3s !== undefined && claimedS > 0) {
      if (volumeMm3 === null) {
        flags.push(makeFlag('missing_estimate', 'The mean flow could not be checked: the filament volume is unknown.'));
      } else {
        // Mean implied flow = extruded volume ÷ claimed time (the whole print averaged).
        const meanMm3s = volumeMm3 / claimedS;
        if (meanMm3s > claims.machineFlowLimitMm3s) {
          flags.push(
            makeFlag(
              'mean_flow_above_machine_limit',
              `Extruding ${fmt(volumeMm3, 0)} mm³ in ${fmtDurationS(claimedS)} means a mean flow of ${fmt(meanMm3s)} mm³/s, above the machine's measured limit of ${fmt(claims.machineFlowLimitMm3s)} mm³/s. Re-run the extrusion-limit test or check the claimed time.`,
            ),
          );
        }
      }
    }
  }

  if (claims.machineFlowLimitMm3s !== undefined && peakMm3s !== null && peakMm3s > claims.machineFlowLimitMm3s) {
    flags.push(
      makeFlag(
        'peak_flow_above_machine_limit',
        `The G-code commands up to ${fmt(peakMm3s)} mm³/s, above the machine's measured limit of ${fmt(claims.machineFlowLimitMm3s)} mm³/s; those moves cannot have run at the commanded speed.`,
      ),
    );
  }

  if (claims.measuredDimensionsMm && claims.testPieceSizeMm) {
    const off = sizeDeviations(claims.measuredDimensionsMm, claims.testPieceSizeMm).filter((d) => Math.abs(d.percent) > tolPct);
    if (off.length > 0) {
      const parts = off.map((d) => `${d.axis.toUpperCase()} ${d.deltaMm >= 0 ? '+' : ''}${fmt(d.deltaMm, 2)} mm (${d.percent >= 0 ? '+' : ''}${fmt(d.percent)} %)`);
      flags.push(
        makeFlag(
          'dimensions_off_test_piece',
          `The measured part differs from the test piece by more than ${tolPct} %: ${parts.join(', ')}. Re-measure the part or check that the right model was printed.`,
        ),
      );
    }
  }

  if (report.size_mm && claims.testPieceSizeMm) {
    const scale = scalePercent(report.size_mm, claims.testPieceSizeMm);
    const off = sizeDeviations(report.size_mm, claims.testPieceSizeMm).filter((d) => Math.abs(d.percent) > tolPct);
    if (scale !== null && off.length > 0) {
      const parts = off.map((d) => `${d.axis.toUpperCase()} ${fmt(report.size_mm![d.axis], 2)} mm vs ${fmt(claims.testPieceSizeMm![d.axis], 2)} mm`);
      flags.push(
        makeFlag(
          'scale_off_test_piece',
          `The G-code prints the part at about ${fmt(scale)} % of the test piece (allowed 100 % ± ${tolPct} %): ${parts.join(', ')}. Slice the test piece at 100 % scale.`,
        ),
      );
    }
  }

  if (claims.duplicateOfEntry) {
    flags.push(makeFlag('duplicate_gcode', `This G-code is the same as the one in entry ${claims.duplicateOfEntry}. Each entrant must upload the G-code of their own print.`));
  }

  return flags;
}
