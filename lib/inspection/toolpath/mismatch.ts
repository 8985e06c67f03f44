/**
 * Declared vs measured settings: where the slicer's comment block and the toolpaths disagree
 * beyond tolerance. A mismatch is itself a flag (the comment block is easy to edit).
 */
import { FLAG_CODES, makeFlag, type FlagCode } from '../plausibility';
import type { Flag, SettingsEvidence } from '../types';

export type SettingName = keyof SettingsEvidence;

/**
 * Allowed |declared − measured| per setting. Counts are exact. Infill ±3 points leaves room for the
 * toolpath measurement (±2 points on real slicer output) plus slicer rounding; layer height ±0.01 mm
 * covers the 3-decimal rounding of Z in G-code. Nozzle is compared through the line width, which
 * slicers set anywhere from 100 % to 125 % of the nozzle, so only a different nozzle size counts.
 */
export const SETTINGS_TOLERANCES: Readonly<Record<SettingName, number>> = {
  walls: 0,
  top_layers: 0,
  bottom_layers: 0,
  infill_percent: 3,
  layer_height_mm: 0.01,
  nozzle_mm: 0.05,
};

const CODES: Record<SettingName, FlagCode> = {
  infill_percent: 'settings_mismatch_infill',
  walls: 'settings_mismatch_walls',
  top_layers: 'settings_mismatch_top_layers',
  bottom_layers: 'settings_mismatch_bottom_layers',
  layer_height_mm: 'settings_mismatch_layer_height',
  nozzle_mm: 'settings_mismatch_nozzle',
};

const LABELS: Record<SettingName, { name: string; unit: string; digits: number; tolUnit?: string }> = {
  infill_percent: { name: 'sparse infill', unit: ' %', digits: 0, tolUnit: ' percentage points' },
  walls: { name: 'wall count', unit: '', digits: 0 },
  top_layers: { name: 'top solid layers', unit: '', digits: 0 },
  bottom_layers: { name: 'bottom solid layers', unit: '', digits: 0 },
  layer_height_mm: { name: 'layer height', unit: ' mm', digits: 2 },
  nozzle_mm: { name: 'nozzle', unit: ' mm', digits: 2 },
};

export const SETTING_NAMES = Object.keys(SETTINGS_TOLERANCES) as SettingName[];

/** True when declared and measured are both known and differ beyond tolerance. */
export function settingDisagrees(name: SettingName, declared: number | null, measured: number | null): boolean {
  if (declared === null || measured === null) return false;
  // A tiny epsilon keeps 0.2 vs 0.21 (float noise) at exactly the tolerance edge from flagging.
  return Math.abs(declared - measured) > SETTINGS_TOLERANCES[name] + 1e-9;
}

export function settingsMismatchFlags(settings: SettingsEvidence): Flag[] {
  const flags: Flag[] = [];
  for (const name of SETTING_NAMES) {
    const e = settings[name];
    if (!e || !settingDisagrees(name, e.declared, e.measured)) continue;
    const l = LABELS[name];
    const tol = SETTINGS_TOLERANCES[name];
    const tolText = tol === 0 ? 'they must match exactly' : `allowed difference ${tol}${l.tolUnit ?? l.unit}`;
    flags.push(
      makeFlag(
        CODES[name],
        `The comment block declares ${l.name} ${e.declared!.toFixed(l.digits)}${l.unit} but the toolpaths show ${e.measured!.toFixed(l.digits)}${l.unit} (${tolText}). The judge should trust the toolpaths; ask the entrant for the unedited G-code.`,
      ),
    );
  }
  return flags;
}

/**
 * True when any setting disagrees; null when no setting has both figures. The nozzle is left out:
 * its measured figure is an estimate from the line width (an info flag, not a contradiction).
 */
export function anySettingMismatch(settings: SettingsEvidence | null | undefined): boolean | null {
  if (!settings) return null;
  let compared = false;
  for (const name of SETTING_NAMES) {
    if (FLAG_CODES[CODES[name]].severity === 'info') continue;
    const e = settings[name];
    if (!e || e.declared === null || e.measured === null) continue;
    compared = true;
    if (settingDisagrees(name, e.declared, e.measured)) return true;
  }
  return compared ? false : null;
}
