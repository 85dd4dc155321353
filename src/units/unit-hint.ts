/**
 * Hints for unit names mathjs does not know: case slips (`kpa` → `kPa`, `PSI` → `psi`),
 * typing slips, and trade spellings plenum writes differently.
 */
import { closestMatches, didYouMean } from '../diag/did-you-mean.js';
import { unitDefinitions } from './math.js';

/** Trade spellings with a fixed answer. */
const KNOWN_MISTAKES: Record<string, string> = {
  gauge: 'only a pressure relative to a reference says `gauge` or `abs`; here write a plain value',
  abs: 'only a pressure relative to a reference says `gauge` or `abs`; here write a plain value',
  absolute: 'only a pressure relative to a reference says `gauge` or `abs`; here write a plain value',
  psig: 'only a pressure relative to a reference says `gauge` or `abs`; here write `psi`',
  psia: 'only a pressure relative to a reference says `gauge` or `abs`; here write `psi`',
  barg: 'only a pressure relative to a reference says `gauge` or `abs`; here write `bar`',
  bara: 'only a pressure relative to a reference says `gauge` or `abs`; here write `bar`',
  psid: 'write a pressure difference as a plain pressure, e.g. `5 psi`',
  ANR: 'only a feed `rate` may be a standard volume flow (`10 L/min ANR`)',
  anr: 'only a feed `rate` may be a standard volume flow (`10 L/min ANR`)',
  lpm: 'write `L/min` (and `ANR` for a standard volume flow: `10 L/min ANR`)',
  slpm: 'write a standard volume flow as `10 L/min ANR`',
  sccm: 'write a standard volume flow as `10 mL/min ANR`',
  scfm: 'write a standard volume flow as `1 ft^3/min ANR`',
  Nl: 'write a standard volume flow as `10 L/min ANR` (ISO 8778 reference atmosphere)',
  NL: 'write a standard volume flow as `10 L/min ANR` (ISO 8778 reference atmosphere)',
  degc: 'write `degC`',
};

let allNames: string[] | undefined;

/** Every unit name with every prefix it accepts, e.g. `kPa`, `mL`, `psi`. */
function prefixedUnitNames(): string[] {
  if (allNames) return allNames;
  const names: string[] = [];
  for (const [name, def] of Object.entries(unitDefinitions())) {
    for (const prefix of Object.keys(def.prefixes ?? { '': 1 })) names.push(prefix + name);
  }
  allNames = names;
  return names;
}

/** A hint for an unknown unit token, or undefined when nothing is close. */
export function unknownUnitHint(token: string): string | undefined {
  // own keys only: `constructor` or `toString` must not find Object's methods
  if (Object.hasOwn(KNOWN_MISTAKES, token)) return KNOWN_MISTAKES[token];
  // Case slips first: an exact case-insensitive match is almost surely what was meant.
  const lower = token.toLowerCase();
  const sameLetters = prefixedUnitNames().filter((n) => n.toLowerCase() === lower);
  if (sameLetters.length) return `unit names are case-sensitive: ${didYouMean(token, sameLetters)}`;
  const close = closestMatches(token, prefixedUnitNames().filter((n) => Math.abs(n.length - token.length) <= 2));
  return close.length ? didYouMean(token, close) : undefined;
}

/** The unknown unit named in a mathjs error message (`Unit "kpa" not found.`). */
export function unknownUnitToken(message: string): string | undefined {
  return /Unit "([^"]*)" not found/.exec(message)?.[1];
}
