/**
 * The numbers both inspection engines share have one definition, lib/inspection/engineConstants.ts;
 * the C++ engine reads them from lib/inspection/native/engine_constants.h, generated from it.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import * as constants from '../../../lib/inspection/engineConstants';
import { HEADER_PATH, nativeConstantsHeader } from '../../../scripts/gen-native-constants';

const NATIVE = join(__dirname, '../../../lib/inspection/native');

describe('engine constants shared by the TypeScript and C++ engines', () => {
  it('the committed C++ header is the one generated from engineConstants.ts (else run npm run gen:native-constants)', () => {
    expect(readFileSync(HEADER_PATH, 'utf8')).toBe(nativeConstantsHeader());
  });

  it('the C++ engine takes every shared constant from the header, and defines none of them again', () => {
    const sources = readdirSync(NATIVE)
      .filter((f) => /\.(cc|h)$/.test(f) && f !== 'engine_constants.h')
      .map((f) => readFileSync(join(NATIVE, f), 'utf8'))
      .join('\n');
    for (const name of Object.keys(constants)) {
      expect(sources, name).toMatch(new RegExp(`engine::${name}\\b`));
      // A local alias is `= engine::NAME`; a literal would be a second definition.
      expect(sources, name).not.toMatch(new RegExp(`\\b${name}(\\[\\])?\\s*=\\s*[-{0-9]`));
    }
  });

  it('prints each value so that C++ reads back the same double', () => {
    const header = nativeConstantsHeader();
    for (const [name, value] of Object.entries(constants)) {
      const m = new RegExp(`\\b${name}(\\[\\])? = \\{?([^;}]+)\\}?;`).exec(header);
      expect(m, name).not.toBeNull();
      const printed = m![2].split(',').map((t) => Number(t.trim()));
      expect(printed).toEqual(Array.isArray(value) ? value : [value]);
    }
  });
});
