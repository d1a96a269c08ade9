/**
 * The words of the round analysis' findings, in one place: each finding kind's message is made
 * here from the numbers the stage that found it already formatted (./format.ts shows values in the
 * instrument's own unit). Trade language, the instrument's own unit, no jargon beyond what a
 * technician or a planner reads on a gauge or a work order.
 */
import { CUSUM_H } from './evidence';

/** "A, B and C" */
export function joinNames(names: readonly string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** lower-case the first letter unless the word is an acronym ("Deaerator" → "deaerator", "LP heater" stays) */
export const lcFirst = (t: string) =>
  t.length > 1 && t[1] === t[1].toLowerCase() ? t[0].toLowerCase() + t.slice(1) : t;

/** "FI-401 or TI-402 (the balances cannot tell which)", or the one tag */
export const whoOf = (tags: readonly string[]) =>
  tags.length > 1 ? `${tags.join(' or ')} (the balances cannot tell which)` : tags[0];

const allow = (plural: boolean) => (plural ? 'allow' : 'allows');

export const messages = {
  unknownInstrument: (name: string) =>
    `A reading names instrument ${name}, which this unit does not have; it was left out.`,
  notANumber: (tag: string, value: string) => `${tag}: the reading ${value} is not a number; it was left out.`,
  duplicate: (tag: string, times: number) => `${tag} was read ${times} times in this round; the last reading was used.`,
  badSigma: (tag: string, sigma: string) =>
    `${tag}: the uncertainty given with the reading (${sigma}) is not a positive number; the instrument's accuracy was used.`,
  noSigma: (tag: string) =>
    `${tag}: its accuracy specification gives no uncertainty for this reading; it was left out.`,
  outOfRange: (tag: string, shown: string, below: boolean, range: string) =>
    `${tag} reads ${shown}, ${below ? 'below' : 'above'} its range ${range}: check the reading, the instrument or its range.`,
  outsideIf97: (tag: string, shown: string, why: string) =>
    `${tag} reads ${shown}, ${why}; it was left out of the balances.`,
  missing: (tag: string, where: string) => `${tag} (${where}) was not read in this round.`,
  notRedundant: (why: string) =>
    `The readings of this round do not over-determine any balance, so none can be checked (${why}).`,
  notReconciled: (why: string) => `The balances could not be reconciled for this round: ${why}.`,
  grossError: (who: string, by: string, above: boolean, phrase: string, plural: boolean, estimate: string) =>
    `${who} reads ${by} ${above ? 'above' : 'below'} what ${phrase} ${allow(plural)} (${estimate}).`,
  grossErrorNoEstimate: (who: string, phrase: string, z: string, zc: string) =>
    `${who} disagrees with ${phrase} (test value ${z} against ${zc}); without it the rest of the plant cannot say what it should read.`,
  readAsAbsolute: (
    tag: string,
    by: string,
    phrase: string,
    plural: boolean,
    estimate: string,
    baro: string,
    unit: string,
  ) =>
    `${tag} looks read as absolute: it reads ${by} below what ${phrase} ${allow(plural)} (${estimate}), which is the barometric pressure of this round (${baro}). A ${unit}(g) value was probably entered as ${unit}(a).`,
  readAsGauge: (
    tag: string,
    by: string,
    phrase: string,
    plural: boolean,
    estimate: string,
    baro: string,
    unit: string,
  ) =>
    `${tag} looks read as gauge: it reads ${by} above what ${phrase} ${allow(plural)} (${estimate}), which is the barometric pressure of this round (${baro}). A ${unit}(a) value was probably entered as ${unit}(g).`,
  vacuumAsAbsolute: (tag: string, value: string, estimate: string, absolute: string, unit: string) =>
    `${tag} looks like a vacuum reading entered as absolute: its ${value} is the vacuum the balances allow (${estimate}), not the absolute pressure (${absolute} absolute). A ${unit} vac value was probably entered as ${unit}(a).`,
  phaseMismatch: (
    where: string,
    vapour: boolean,
    tTags: readonly string[],
    shownT: string,
    by: string,
    tsat: string,
    shownP: string,
  ) =>
    `At ${where}, expected ${vapour ? 'superheated steam' : 'water below boiling'}, ${joinNames(tTags)} read${tTags.length > 1 ? '' : 's'} ${shownT}, ${by} ${vapour ? 'below' : 'above'} the saturation temperature ${tsat} at ${shownP}: one of them is wrong, or the ${vapour ? 'steam is wet' : 'water is flashing'}.`,
  stuck: (tag: string, shown: string, rounds: number, moved: string) =>
    `${tag} has read ${shown} on the last ${rounds} rounds while its neighbours moved (${moved}): the needle or the reading may be stuck.`,
  balanceNotClosed: (
    equipment: string,
    what: string,
    inflow: string,
    outflow: string,
    relative: string,
    allowed: string,
    k: number,
    explainedBy: readonly string[],
  ) =>
    `The ${equipment} ${what} does not close: ${inflow} in against ${outflow} out${relative}, more than the ${allowed} the readings' uncertainties allow (${k}σ)${explainedBy.length ? `; ${joinNames(explainedBy)} would explain it` : ''}.`,
  sustainedBias: (tags: readonly string[], high: boolean, cusum: number, rounds: number) =>
    `${whoOf(tags)} has read ${high ? 'high' : 'low'} against the balances round after round: the evidence of its last ${rounds} rounds (CUSUM ${cusum.toFixed(1)}) has passed the ${CUSUM_H} that opens a work order.`,
};
