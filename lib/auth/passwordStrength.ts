/**
 * Password strength with zxcvbn (@zxcvbn-ts): it estimates how many guesses an attacker with lists
 * of common passwords, words, names, keyboard walks, dates and repeats would need. Score 0–4;
 * we ask for at least 3 ("safely unguessable: moderate protection from offline slow-hash
 * scenario", zxcvbn's own scale). Its feedback (warning + suggestions) is the sentence people see.
 */
import { ZxcvbnFactory } from '@zxcvbn-ts/core';
import * as common from '@zxcvbn-ts/language-common';
import * as en from '@zxcvbn-ts/language-en';

export const MIN_PASSWORD_SCORE = 3;

// Built on first use: the dictionaries are large, and most imports of the schemas never check one.
let factory: ZxcvbnFactory | null = null;
const estimator = () =>
  (factory ??= new ZxcvbnFactory({
    dictionary: { ...common.dictionary, ...en.dictionary },
    graphs: common.adjacencyGraphs,
    translations: en.translations,
  }));

/** Null when strong enough; otherwise one sentence saying why not and what to do. */
export function passwordWeakness(password: string, userInputs: string[] = []): string | null {
  // zxcvbn's cost grows with length; past 100 characters a password is long enough on its own.
  if (password.length > 100) return null;
  const result = estimator().check(password, userInputs.filter(Boolean));
  if (result.score >= MIN_PASSWORD_SCORE) return null;
  const why = result.feedback.warning ?? 'This password would be guessed quickly.';
  const how = result.feedback.suggestions[0] ?? 'Use a few uncommon words together.';
  return `${why.replace(/\.?$/, '.')} ${how.replace(/\.?$/, '.')}`;
}
