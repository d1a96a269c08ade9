/**
 * What the balances can check, in words, from the detectability map (shared/cycle/detectability.ts):
 * "The balances notice TI-301 from 0.96 K off", "No balance can check TI-103: a twin of its class
 * beside it would (from 1.2 K off)". Differences in the instrument's own unit (K, kPa or bar, t/h, kW).
 */
import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import type { InstrumentDetectability, Remedy, UnitDetectability } from '@/shared/api/detectability';
import { showDeltaOf } from './instrument-values';
import { ThemedText } from './themed-text';

const QUANTITY_DEVICE: Record<string, string> = {
  pressure: 'pressure gauge',
  temperature: 'thermometer',
  massFlow: 'flow meter',
  power: 'power meter',
  level: 'level gauge',
};

/** The one added or upgraded measurement, said with what it would give. */
export function remedyWords(r: Remedy): string {
  const from = `the balances would notice it from ${showDeltaOf(r.quantity, r.mdb)} off`;
  if (r.kind === 'twin')
    return `A second ${QUANTITY_DEVICE[r.quantity] ?? 'instrument'} of its class beside it: ${from}.`;
  if (r.kind === 'new-reading')
    return `A new ${r.device} at ${r.pointLabel.charAt(0).toLowerCase()}${r.pointLabel.slice(1)}: ${from}.`;
  return `${r.tag} with half its uncertainty (a tighter class, ±${showDeltaOf(r.quantity, r.sigmaTo)} instead of ±${showDeltaOf(r.quantity, r.sigmaFrom)}): ${from}.`;
}

/** One instrument's line of the map. */
export function detectabilityWords(d: InstrumentDetectability): string {
  switch (d.status) {
    case 'not-read':
      return `${d.tag} was not read in the latest analysed round: no figure.`;
    case 'unchecked':
      return d.quantity === 'level'
        ? `No balance can check ${d.tag}: levels enter no balance; only a second gauge glass, compared by eye, would show a fault.`
        : `No balance can check ${d.tag}: a bias of any size stays unseen.`;
    case 'weak':
      return `The balances notice ${d.tag} only from ${showDeltaOf(d.quantity, d.mdb!)} off (redundancy ${d.redundancy!.toPrecision(2)}: weakly checked).`;
    default:
      return `The balances notice ${d.tag} from ${showDeltaOf(d.quantity, d.mdb!)} off (redundancy ${d.redundancy!.toFixed(2)}).`;
  }
}

/** "at a 5 % test level, found 80 % of the time" */
export function powerWords(u: Pick<UnitDetectability, 'alpha' | 'beta'>): string {
  return `a bias that size is found in ${Math.round((1 - u.beta) * 100)} % of rounds by the per-reading test at ${Math.round(u.alpha * 1000) / 10} %`;
}

/** The map of one unit: counts, then every instrument no balance checks (or checks weakly) with its remedy. */
export function DetectabilitySummary({ unit, testID }: { unit: UnitDetectability; testID: string }) {
  const rows = unit.instruments;
  const checked = rows.filter((r) => r.status === 'checked').length;
  const open = rows.filter((r) => r.status === 'unchecked' || r.status === 'weak');
  return (
    <View style={styles.stack} testID={testID}>
      <ThemedText variant="label" bold>{`What the balances can check — ${unit.unitName}`}</ThemedText>
      <ThemedText variant="caption" muted>
        {`At the unit's latest analysed round (analysed ${new Date(unit.analysedAt).toLocaleString()}): ${checked} of ${rows.length} instruments are checked by the balances; ${open.filter((r) => r.status === 'unchecked').length} no balance can check, ${open.filter((r) => r.status === 'weak').length} only weakly. “Notice from” is the smallest bias the balances find: ${powerWords(unit)} (Baarda's minimal detectable bias).`}
      </ThemedText>
      {open.map((r) => (
        <View key={r.tag} style={styles.item} testID={`${testID}-${r.tag}`}>
          <ThemedText
            variant="label"
            tone={r.status === 'unchecked' ? 'danger' : undefined}
          >{`${r.status === 'unchecked' ? '◆' : '◇'} ${detectabilityWords(r)}`}</ThemedText>
          {r.remedy ? (
            <ThemedText variant="caption">{`What would check it: ${remedyWords(r.remedy)}`}</ThemedText>
          ) : null}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.sm },
  item: { gap: space.xxs },
});
