/**
 * Changing one instrument's configuration (PATCH …/instruments/:id, admins): its range in the
 * unit its face reads (bar in its own reference, °C, t/h, MW, %), the class of its accuracy
 * specification, the calibration interval and the status. The form checks numbers and order
 * itself; the server's limits come back per field and stand under that field.
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Field } from '@/components/field';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { ApiError } from '@/lib/api-client';
import { useUpdateInstrument } from '@/hooks/queries/admin';
import {
  ACCURACY_CLASSES,
  CALIBRATION_INTERVAL_MAX_DAYS,
  type InstrumentUpdateRequest,
} from '@/shared/api/instruments';
import { INSTRUMENT_STATUSES, type InstrumentStatus, type SyncInstrument } from '@/shared/api/sync';

/** Range ends as typed ↔ SI, by quantity (1 bar = 10⁵ Pa, 1 t/h = 1/3.6 kg/s, 1 MW = 10⁶ W: NIST SP 811). */
export const rangeUnit: Record<
  SyncInstrument['quantity'],
  { unit: (i: SyncInstrument) => string; toSI: (v: number) => number; fromSI: (v: number) => number; digits: number }
> = {
  pressure: {
    unit: (i) => `bar ${i.reference ?? 'absolute'}`,
    toSI: (v) => v * 1e5,
    fromSI: (v) => v / 1e5,
    digits: 3,
  },
  temperature: { unit: () => '°C', toSI: (v) => v + 273.15, fromSI: (v) => v - 273.15, digits: 1 },
  massFlow: { unit: () => 't/h', toSI: (v) => v / 3.6, fromSI: (v) => v * 3.6, digits: 2 },
  power: { unit: () => 'MW', toSI: (v) => v * 1e6, fromSI: (v) => v / 1e6, digits: 3 },
  level: { unit: () => '%', toSI: (v) => v / 100, fromSI: (v) => v * 100, digits: 1 },
};

const statusWords: Record<InstrumentStatus, string> = {
  ok: 'In service',
  suspect: 'Suspect',
  'out-of-service': 'Out of service',
};

/** A decimal number as typed: a point, not a comma. */
const decimal = z
  .string()
  .trim()
  .min(1, 'Enter a number.')
  .refine((v) => !v.includes(','), 'Use a decimal point, not a comma.')
  .refine((v) => /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(v), 'That is not a number.');

export const instrumentFormSchema = z
  .object({
    rangeMin: decimal,
    rangeMax: decimal,
    accuracyClass: z.string().trim(),
    interval: z
      .string()
      .trim()
      .refine((v) => v === '' || /^\d+$/.test(v), 'Enter whole days, or leave empty for none.')
      .refine(
        (v) => v === '' || (Number(v) >= 1 && Number(v) <= CALIBRATION_INTERVAL_MAX_DAYS),
        `From 1 to ${CALIBRATION_INTERVAL_MAX_DAYS} days.`,
      ),
    status: z.enum(INSTRUMENT_STATUSES),
  })
  .refine((f) => !(Number(f.rangeMax) <= Number(f.rangeMin)), {
    path: ['rangeMax'],
    message: 'Must be above the lower end.',
  });
export type InstrumentForm = z.infer<typeof instrumentFormSchema>;

export function classOf(i: SyncInstrument): { value: string; spec: (typeof ACCURACY_CLASSES)[string] } | null {
  const a = i.accuracy as { kind?: string; class?: unknown; grade?: unknown } | null;
  const spec = a?.kind ? ACCURACY_CLASSES[a.kind] : undefined;
  if (!a || !spec) return null;
  return { value: String(spec.field === 'grade' ? a.grade : a.class), spec };
}

export function defaultsOf(i: SyncInstrument): InstrumentForm {
  const u = rangeUnit[i.quantity];
  const show = (v: number) => String(Number(u.fromSI(v).toFixed(u.digits + 3)));
  return {
    rangeMin: i.range ? show(i.range.min) : '',
    rangeMax: i.range ? show(i.range.max) : '',
    accuracyClass: classOf(i)?.value ?? '',
    interval: i.calibrationIntervalDays === null ? '' : String(i.calibrationIntervalDays),
    status: i.status,
  };
}

/** The request body: only what changed, with the row version it was read at. */
export function changesOf(i: SyncInstrument, f: InstrumentForm): InstrumentUpdateRequest {
  const d = defaultsOf(i);
  const u = rangeUnit[i.quantity];
  const out: InstrumentUpdateRequest = { rowVersion: i.rowVersion };
  if (f.rangeMin.trim() !== d.rangeMin || f.rangeMax.trim() !== d.rangeMax)
    out.range = { min: u.toSI(Number(f.rangeMin)), max: u.toSI(Number(f.rangeMax)) };
  if (classOf(i) && f.accuracyClass.trim() !== d.accuracyClass) out.accuracyClass = f.accuracyClass.trim();
  if (f.interval.trim() !== d.interval)
    out.calibrationIntervalDays = f.interval.trim() === '' ? null : Number(f.interval);
  if (f.status !== d.status) out.status = f.status;
  return out;
}

const FIELD_WORDS: Record<string, string> = {
  range: 'range',
  accuracy: 'accuracy class',
  calibrationIntervalDays: 'calibration interval',
  status: 'status',
};

/** The form field a server detail path belongs to. */
const FIELD_OF: Record<string, keyof InstrumentForm> = {
  'range.min': 'rangeMin',
  'range.max': 'rangeMax',
  range: 'rangeMax',
  accuracyClass: 'accuracyClass',
  calibrationIntervalDays: 'interval',
  status: 'status',
};

export function InstrumentEditForm({ instrument, onClose }: { instrument: SyncInstrument; onClose: () => void }) {
  const update = useUpdateInstrument();
  const [saved, setSaved] = useState<string | null>(null);
  const [failure, setFailure] = useState<string | null>(null);
  const u = rangeUnit[instrument.quantity];
  const cls = classOf(instrument);
  const { control, handleSubmit, setError, formState } = useForm<InstrumentForm>({
    resolver: zodResolver(instrumentFormSchema),
    defaultValues: defaultsOf(instrument),
  });

  const onSubmit = handleSubmit(async (f) => {
    setSaved(null);
    setFailure(null);
    const body = changesOf(instrument, f);
    if (Object.keys(body).length === 1) {
      setFailure('Nothing changed.');
      return;
    }
    try {
      const out = await update.mutateAsync({ instrumentId: instrument.id, body });
      const fields = Object.keys(out.changes).map((k) => FIELD_WORDS[k] ?? k);
      setSaved(
        fields.length
          ? `✓ Saved ${out.instrument.tag}: ${fields.join(', ')} changed.`
          : `✓ ${out.instrument.tag} was already so.`,
      );
    } catch (e) {
      const details =
        e instanceof ApiError && Array.isArray(e.details) ? (e.details as { path?: string; message?: string }[]) : [];
      let placed = false;
      for (const d of details) {
        const field = d.path ? FIELD_OF[d.path] : undefined;
        if (field && d.message) {
          setError(field, { message: d.message });
          placed = true;
        }
      }
      if (!placed) setFailure(e instanceof Error ? e.message : 'Not saved.');
    }
  });

  const text = (
    name: 'rangeMin' | 'rangeMax' | 'accuracyClass' | 'interval',
    label: string,
    testID: string,
    hint?: string,
  ) => (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <View style={styles.grow}>
          <Field
            label={label}
            testID={testID}
            value={field.value}
            onChangeText={field.onChange}
            onBlur={field.onBlur}
            error={fieldState.error?.message}
            hint={hint}
            autoCapitalize="none"
            inputMode={name === 'accuracyClass' ? 'text' : 'decimal'}
          />
        </View>
      )}
    />
  );

  return (
    <Card testID="instrument-edit">
      <View style={styles.head}>
        <ThemedText variant="title">{`Change ${instrument.tag}`}</ThemedText>
        <Button label="Close" kind="plain" testID="instrument-edit-close" onPress={onClose} />
      </View>
      <View style={styles.row}>
        {text('rangeMin', `Range from, ${u.unit(instrument)}`, 'instrument-edit-min')}
        {text('rangeMax', `Range to, ${u.unit(instrument)}`, 'instrument-edit-max')}
      </View>
      <View style={styles.row}>
        {cls ? (
          text(
            'accuracyClass',
            `${cls.spec.standard} ${cls.spec.field}`,
            'instrument-edit-class',
            `One of ${cls.spec.values.join(', ')}`,
          )
        ) : (
          <View style={styles.grow}>
            <ThemedText variant="label" muted testID="instrument-edit-no-class">
              Its accuracy is not given by a class: change it in the unit’s model.
            </ThemedText>
          </View>
        )}
        {text('interval', 'Calibration interval, days', 'instrument-edit-interval', 'Empty: no interval')}
      </View>
      <Controller
        control={control}
        name="status"
        render={({ field, fieldState }) => (
          <View style={styles.stack}>
            <ThemedText variant="label" bold>
              Status
            </ThemedText>
            <View style={styles.row}>
              {INSTRUMENT_STATUSES.map((s) => (
                <Button
                  key={s}
                  label={statusWords[s]}
                  kind={field.value === s ? 'primary' : 'plain'}
                  selected={field.value === s}
                  testID={`instrument-edit-status-${s}`}
                  onPress={() => field.onChange(s)}
                />
              ))}
            </View>
            {fieldState.error ? (
              <ThemedText
                variant="caption"
                tone="danger"
                accessibilityRole="alert"
                testID="instrument-edit-status-error"
              >
                {fieldState.error.message}
              </ThemedText>
            ) : null}
          </View>
        )}
      />
      <Button label="Save" testID="instrument-edit-save" busy={formState.isSubmitting} onPress={onSubmit} />
      {failure ? (
        <ThemedText tone="danger" accessibilityRole="alert" testID="instrument-edit-error">
          {failure}
        </ThemedText>
      ) : null}
      {saved ? (
        <ThemedText tone="ok" testID="instrument-edit-saved">
          {saved}
        </ThemedText>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.sm },
  head: {
    flexDirection: 'row',
    justifyContent: 'space-between',
    alignItems: 'center',
    flexWrap: 'wrap',
    gap: space.md,
  },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  grow: { flexGrow: 1, flexBasis: 200 },
});
