import { useEffect, useState } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import { fonts, radius, space, touchTarget, type } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import type { RouteCheck } from '@/shared/route/template';
import { Button } from './button';
import { ThemedText } from './themed-text';

export type CheckValue =
  { kind: 'yes-no'; value: boolean } | { kind: 'choice'; value: string } | { kind: 'text'; value: string };

/** One yes/no, choice or free-text check at a stop. */
export function CheckField({
  check,
  answer,
  onAnswer,
  onPhoto,
  photoCount,
}: {
  check: RouteCheck;
  answer?: CheckValue;
  onAnswer(v: CheckValue): void;
  onPhoto?(): void;
  photoCount: number;
}) {
  const { colors } = useTheme();
  const id = `check-${check.id}`;
  const [text, setText] = useState(answer?.kind === 'text' ? answer.value : '');
  useEffect(() => {
    if (answer?.kind === 'text') setText(answer.value);
  }, [answer]);
  const off =
    check.kind === 'yes-no' &&
    answer?.kind === 'yes-no' &&
    check.expected !== undefined &&
    answer.value !== check.expected;
  return (
    <View
      testID={id}
      style={[styles.wrap, { borderColor: off ? colors.warning : colors.rule, backgroundColor: colors.surface }]}
    >
      <ThemedText variant="label" bold>
        {check.prompt}
      </ThemedText>
      {check.kind === 'yes-no' ? (
        <View style={styles.row}>
          {[true, false].map((v) => (
            <Button
              key={String(v)}
              testID={`${id}-${v ? 'yes' : 'no'}`}
              label={v ? 'Yes' : 'No'}
              kind={answer?.kind === 'yes-no' && answer.value === v ? 'primary' : 'plain'}
              selected={answer?.kind === 'yes-no' && answer.value === v}
              onPress={() => onAnswer({ kind: 'yes-no', value: v })}
            />
          ))}
        </View>
      ) : null}
      {check.kind === 'choice' ? (
        <View style={styles.row}>
          {check.options.map((o, i) => (
            <Button
              key={o}
              testID={`${id}-opt-${i}`}
              label={o}
              kind={answer?.kind === 'choice' && answer.value === o ? 'primary' : 'plain'}
              selected={answer?.kind === 'choice' && answer.value === o}
              onPress={() => onAnswer({ kind: 'choice', value: o })}
            />
          ))}
        </View>
      ) : null}
      {check.kind === 'text' ? (
        <TextInput
          testID={`${id}-text`}
          accessibilityLabel={check.prompt}
          value={text}
          onChangeText={setText}
          onBlur={() => text.trim() && onAnswer({ kind: 'text', value: text.trim() })}
          multiline
          style={[styles.text, { color: colors.text, borderColor: colors.rule, backgroundColor: colors.background }]}
        />
      ) : null}
      {off ? (
        <ThemedText variant="caption" tone="warning" testID={`${id}-off`}>
          Not the healthy answer: add a note or a photo for the planner.
        </ThemedText>
      ) : null}
      {check.photoRequired || onPhoto ? (
        <View style={styles.row}>
          {onPhoto ? (
            <Button
              testID={`${id}-photo`}
              label={photoCount ? `Photo (${photoCount})` : 'Add photo'}
              kind="plain"
              onPress={onPhoto}
            />
          ) : null}
          {check.photoRequired && photoCount === 0 ? (
            <ThemedText variant="caption" muted>
              A photo is required here.
            </ThemedText>
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { borderWidth: 1, borderRadius: radius.sm, padding: space.md, gap: space.sm },
  row: { flexDirection: 'row', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  text: {
    minHeight: touchTarget * 1.5,
    borderWidth: 1,
    borderRadius: radius.sm,
    padding: space.sm,
    fontFamily: fonts.regular,
    fontSize: type.body.fontSize,
  },
});
