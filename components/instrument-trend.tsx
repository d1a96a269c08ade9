/** An instrument's trend (TrendChart) sized to the space it is given, from its history points. */
import { useState } from 'react';
import { View, type LayoutChangeEvent } from 'react-native';
import { TrendChart, type TrendSample } from './trend-chart';
import { deltaInUnit, gaugeUnitLabel, valueInUnit } from '@/lib/instrument-figures';
import type { InstrumentHistoryResponse } from '@/shared/api/analysis';

/**
 * The history in the unit and reference on the gauge's face (bar(g), kPa vacuum, °C…): each
 * point's gauge or vacuum value with the barometric pressure its analysis used.
 */
export function trendSamples(h: InstrumentHistoryResponse): TrendSample[] {
  const { quantity: q, gaugeUnit: unit, reference } = h.instrument;
  return h.points.map((p) => {
    const ref = p.estimate ?? p.reconciled;
    const sigma = p.estimate !== null ? p.estimateSigma : p.reconciledSigma;
    return {
      t: Date.parse(p.measuredAt),
      measured: p.reading === null ? null : valueInUnit(q, p.reading, unit, reference, p.barometricPa),
      reconciled: ref === null ? null : valueInUnit(q, ref, unit, reference, p.barometricPa),
      sigma: sigma === null ? null : (deltaInUnit(q, sigma, unit) ?? null),
    };
  });
}

export const trendUnit = (h: InstrumentHistoryResponse) =>
  gaugeUnitLabel(h.instrument.gaugeUnit, h.instrument.reference);

export function InstrumentTrend({ history, height = 280 }: { history: InstrumentHistoryResponse; height?: number }) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width));
  return (
    <View onLayout={onLayout} testID="instrument-trend">
      {width > 0 ? (
        <TrendChart samples={trendSamples(history)} unit={trendUnit(history)} width={width} height={height} />
      ) : null}
    </View>
  );
}
