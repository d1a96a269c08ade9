import { useEffect, useRef, useState } from 'react';
import { Pressable, StyleSheet, TextInput, View } from 'react-native';
import { fonts, radius, space, touchTarget, type } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import type { SpotFlag } from '@/shared/checks';
import { Button } from './button';
import { SeverityMark } from './severity-mark';
import { ThemedText } from './themed-text';

export const SKIP_REASONS = [
  'Gauge not reachable',
  'Gauge broken or unreadable',
  'Equipment out of service',
  'Isolated for work',
] as const;

export interface ReadingFieldProps {
  tag: string;
  description?: string;
  /** What the gauge shows, e.g. "bar(g)", "kPa vac", "°C". */
  unitLabel: string;
  /** Expected band, already worded in the gauge's unit ("38.0 – 42.0"). */
  bandText?: string;
  /** The value as saved (text as typed), if any. */
  saved?: string;
  skipped?: string | null;
  confirmed?: boolean;
  flags: SpotFlag[];
  /** Parse and check; returns an error text for the field or null when saved. */
  onSave(text: string): Promise<string | null> | string | null;
  onSkip(reason: string): void;
  onConfirm(): void;
  onPhoto?(): void;
  /** A finished round: the value is shown, not editable; `readOnlyNote` says why. */
  readOnly?: boolean;
  readOnlyNote?: string;
  /** Open with the cursor in the field (a re-take sent the technician here). */
  autoFocus?: boolean;
}

/** What the field holds: nothing yet, typed but not saved, saved, or saved and flagged by the spot checks. */
export type FieldState = 'empty' | 'unsaved' | 'saved' | 'flagged';

const STATE_WORDS: Record<Exclude<FieldState, 'empty'>, string> = {
  unsaved: 'Not saved yet — tap Save',
  saved: '✓ Saved on this device',
  flagged: '! Saved, needs a re-read',
};

export function fieldState(text: string, saved: string | undefined, flagged: boolean): FieldState {
  const typed = text.trim();
  if (saved === undefined) return typed === '' ? 'empty' : 'unsaved';
  if (typed !== '' && Number(typed) !== Number(saved)) return 'unsaved';
  if (typed === '' && saved !== '') return 'unsaved';
  return flagged ? 'flagged' : 'saved';
}

const NUMBER = /^[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?$/;

/** Parses what a technician typed into a number, or says what is wrong with it. */
export function parseTyped(text: string): { value: number } | { error: string } {
  const t = text.trim();
  if (t === '') return { error: 'Enter the value the gauge shows, or skip it with a reason.' };
  if (/^[-+]?\d+,\d+$/.test(t)) return { error: 'Use a decimal point, not a comma (e.g. 12.5).' };
  if (!NUMBER.test(t)) return { error: `"${t}" is not a number. Enter digits only, e.g. 12.5.` };
  return { value: Number(t) };
}

/**
 * One reading at a stop: the tag, the value field with its unit and reference, the expected band,
 * and under it whatever the on-the-spot checks say — a flagged value asks for a re-read, and the
 * technician either corrects it or confirms the gauge really shows it.
 */
export function ReadingField(p: ReadingFieldProps) {
  const { colors } = useTheme();
  const [text, setText] = useState(p.saved ?? '');
  const [error, setError] = useState<string | null>(null);
  const [skipOpen, setSkipOpen] = useState(false);
  // Undoing a skip opens the field again; the skip stays recorded until a value is saved over it.
  const [unskipped, setUnskipped] = useState(false);
  useEffect(() => setText(p.saved ?? ''), [p.saved]);
  useEffect(() => setUnskipped(false), [p.skipped]);
  const id = `reading-${p.tag}`;
  const flagged = p.flags.length > 0 && !p.confirmed;
  const skipped = p.skipped && !unskipped ? p.skipped : null;
  const state = fieldState(text, p.saved, flagged);

  // Leaving the field and tapping Save both save: the same text is recorded once.
  const submitted = useRef<string | null>(null);
  const save = async () => {
    if (text === submitted.current || (p.saved !== undefined && Number(text) === Number(p.saved) && text.trim() !== ''))
      return;
    submitted.current = text;
    const e = await p.onSave(text);
    if (e) submitted.current = null;
    setError(e);
  };

  const head = (
    <View style={styles.head}>
      <ThemedText variant="title" testID={`${id}-tag`}>
        {p.tag}
      </ThemedText>
      {p.bandText ? (
        <ThemedText variant="caption" muted testID={`${id}-band`}>
          expected {p.bandText} {p.unitLabel}
        </ThemedText>
      ) : null}
    </View>
  );

  if (p.readOnly) {
    return (
      <View
        testID={id}
        style={[styles.wrap, styles.readOnly, { borderColor: colors.rule, backgroundColor: colors.surfaceAlt }]}
      >
        {head}
        <ThemedText variant="title" testID={`${id}-value`}>
          {p.skipped ? `Skipped: ${p.skipped}` : p.saved !== undefined ? `${p.saved} ${p.unitLabel}` : 'Not read'}
        </ThemedText>
        {p.flags.map((f, i) => (
          <View key={i} style={styles.flagLine} testID={`${id}-flag-${f.kind}`}>
            <SeverityMark severity={f.severity} />
            <ThemedText variant="label">{f.message}</ThemedText>
          </View>
        ))}
        {p.readOnlyNote ? (
          <ThemedText variant="caption" muted testID={`${id}-readonly`}>
            {p.readOnlyNote}
          </ThemedText>
        ) : null}
      </View>
    );
  }

  return (
    <View
      testID={id}
      style={[styles.wrap, { borderColor: flagged ? colors.warning : colors.rule, backgroundColor: colors.surface }]}
    >
      {head}
      {p.description ? (
        <ThemedText variant="label" muted>
          {p.description}
        </ThemedText>
      ) : null}
      {skipped ? (
        <View style={styles.row}>
          <ThemedText testID={`${id}-skipped`}>Skipped: {skipped}</ThemedText>
          <Button testID={`${id}-unskip`} label="Undo skip" kind="plain" onPress={() => setUnskipped(true)} />
        </View>
      ) : (
        <View style={styles.row}>
          <TextInput
            testID={`${id}-input`}
            accessibilityLabel={`${p.tag} in ${p.unitLabel}`}
            inputMode="decimal"
            keyboardType="decimal-pad"
            value={text}
            onChangeText={setText}
            onBlur={save}
            onSubmitEditing={save}
            placeholder="—"
            autoFocus={p.autoFocus || unskipped}
            placeholderTextColor={colors.textMuted}
            style={[
              styles.input,
              {
                color: colors.text,
                borderColor: error ? colors.danger : colors.rule,
                backgroundColor: colors.background,
              },
            ]}
          />
          <ThemedText variant="title" style={styles.unit} testID={`${id}-unit`}>
            {p.unitLabel}
          </ThemedText>
          <Button testID={`${id}-save`} label="Save" kind="plain" onPress={save} />
        </View>
      )}
      {state !== 'empty' && !skipped ? (
        <ThemedText
          variant="label"
          bold
          tone={state === 'saved' ? 'ok' : state === 'flagged' ? 'warning' : undefined}
          testID={`${id}-state`}
        >
          {STATE_WORDS[state]}
        </ThemedText>
      ) : null}
      {unskipped && p.skipped ? (
        <ThemedText variant="caption" muted testID={`${id}-unskip-note`}>
          The skip ({p.skipped}) stays recorded until you save a value.
        </ThemedText>
      ) : null}
      {error ? (
        <ThemedText tone="danger" variant="caption" testID={`${id}-error`} accessibilityRole="alert">
          {error}
        </ThemedText>
      ) : null}
      {p.flags.map((f, i) => (
        <View
          key={i}
          style={[
            styles.flag,
            { borderLeftColor: f.severity === 1 ? colors.danger : colors.warning, backgroundColor: colors.surfaceAlt },
          ]}
          testID={`${id}-flag-${f.kind}`}
        >
          <SeverityMark severity={f.severity} />
          <ThemedText variant="label">{f.message}</ThemedText>
        </View>
      ))}
      {flagged ? (
        <View style={styles.actions}>
          <ThemedText variant="label" bold testID={`${id}-reread`}>
            Re-read the gauge now. Correct the value, or confirm it if the gauge really shows it.
          </ThemedText>
          <View style={styles.row}>
            <Button testID={`${id}-confirm`} label="Gauge shows this" kind="accent" onPress={p.onConfirm} />
            {p.onPhoto ? (
              <Button testID={`${id}-photo-suggest`} label="Add a photo" kind="plain" onPress={p.onPhoto} />
            ) : null}
          </View>
        </View>
      ) : null}
      {p.confirmed && p.flags.length > 0 ? (
        <ThemedText variant="caption" muted testID={`${id}-confirmed`}>
          Confirmed at the gauge.
        </ThemedText>
      ) : null}
      {!skipped && !unskipped ? (
        <View style={styles.row}>
          <Pressable
            testID={`${id}-skip`}
            accessibilityRole="button"
            onPress={() => setSkipOpen((o) => !o)}
            style={styles.link}
          >
            <ThemedText variant="label" style={{ color: colors.primary }}>
              {skipOpen ? 'Don’t skip it' : 'Cannot read it…'}
            </ThemedText>
          </Pressable>
          {p.onPhoto && !flagged ? (
            <Pressable testID={`${id}-photo`} accessibilityRole="button" onPress={p.onPhoto} style={styles.link}>
              <ThemedText variant="label" style={{ color: colors.primary }}>
                Photo of the gauge
              </ThemedText>
            </Pressable>
          ) : null}
        </View>
      ) : null}
      {skipOpen && !skipped ? (
        <View style={styles.reasons}>
          {SKIP_REASONS.map((r, i) => (
            <Button
              key={r}
              testID={`${id}-skip-${i}`}
              label={r}
              kind="plain"
              onPress={() => {
                setSkipOpen(false);
                p.onSkip(r);
              }}
            />
          ))}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { borderWidth: 1, borderRadius: radius.sm, padding: space.md, gap: space.sm },
  head: {
    flexDirection: 'row',
    justifyContent: 'space-between',
    alignItems: 'baseline',
    flexWrap: 'wrap',
    gap: space.sm,
  },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  input: {
    minHeight: touchTarget + 8,
    minWidth: 140,
    flex: 1,
    borderWidth: 2,
    borderRadius: radius.sm,
    paddingHorizontal: space.md,
    fontFamily: fonts.bold,
    fontSize: type.heading.fontSize,
    textAlign: 'right',
    fontVariant: ['tabular-nums'],
  },
  unit: { minWidth: 72 },
  flag: { borderLeftWidth: 6, padding: space.sm, gap: space.xs },
  flagLine: { flexDirection: 'row', alignItems: 'center', gap: space.xs, flexWrap: 'wrap' },
  readOnly: { borderStyle: 'dashed' },
  actions: { gap: space.sm },
  link: { minHeight: touchTarget, justifyContent: 'center' },
  reasons: { gap: space.xs },
});
