import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { useRoundCheck } from '@/hooks/use-round-check';
import type { RoundCheck } from '@/shared/round-check';
import { Button } from './button';
import { ThemedText } from './themed-text';

/** The headline of a round check, in one sentence. */
export function roundCheckHeadline(r: RoundCheck): { text: string; tone: 'ok' | 'warning' | 'danger' } {
  const open = r.retakes.filter((i) => i.dismissed === null);
  if (open.length) {
    return {
      text: `${open.length === 1 ? 'One reading' : `${open.length} readings`} to re-take before you leave the unit: ${open.map((i) => i.tag).join(', ')}.`,
      tone: 'danger',
    };
  }
  if (r.clean && r.complete)
    return { text: 'The round holds together: every balance closes and no reading stands out.', tone: 'ok' };
  if (r.clean)
    return {
      text: 'No reading stands out, but some balances cannot be formed yet: see what is missing.',
      tone: 'warning',
    };
  const elsewhere = r.elsewhere.filter((i) => i.dismissed === null);
  if (elsewhere.length)
    return {
      text: `Nothing to re-take on this route; ${elsewhere.map((i) => i.tag).join(', ')} on another round look${elsewhere.length > 1 ? '' : 's'} wrong.`,
      tone: 'warning',
    };
  return {
    text: 'Nothing left to re-take, but a balance still does not close: the engineer will see it.',
    tone: 'warning',
  };
}

/** The round check in the finish panel: its headline and the way to the full check. */
export function RoundCheckSummary({ roundId, onOpen }: { roundId: string; onOpen(): void }) {
  const { load, roundCheck, checking, error } = useRoundCheck(roundId);
  let line: { text: string; tone?: 'ok' | 'warning' | 'danger' } = { text: 'Checking the round on this device…' };
  if (error) line = { text: error.message, tone: 'danger' };
  else if (load && !load.ok) line = { text: load.problem, tone: 'warning' };
  else if (roundCheck && !checking) line = roundCheckHeadline(roundCheck);
  return (
    <View style={styles.box} testID="round-check-summary">
      <ThemedText variant="label" bold tone={line.tone} testID="round-check-summary-text">
        {line.text}
      </ThemedText>
      <Button testID="finish-check" label="Check the round" kind="plain" onPress={onOpen} />
    </View>
  );
}

const styles = StyleSheet.create({ box: { gap: space.sm } });
