/** An instrument's trend (TrendChart) sized to the space it is given, from its history points. */
import { useState } from 'react';
import { View, type LayoutChangeEvent } from 'react-native';
import { TrendChart, type TrendSample } from './trend-chart';
import { displayNumber, displayScale, displayUnit } from './instrument-values';
import type { InstrumentHistoryResponse } from '@/shared/api/analysis';

export function trendSamples(h: InstrumentHistoryResponse): TrendSample[] {
  const q = h.instrument.quantity;
  return h.points.map((p) => {
    const ref = p.estimate ?? p.reconciled;
    const sigma = p.estimate !== null ? p.estimateSigma : p.reconciledSigma;
    return {
      t: Date.parse(p.measuredAt),
      measured: p.reading === null ? null : displayNumber(q, p.reading),
      reconciled: ref === null ? null : displayNumber(q, ref),
      sigma: sigma === null ? null : sigma * displayScale(q),
    };
  });
}

export function InstrumentTrend({ history, height = 280 }: { history: InstrumentHistoryResponse; height?: number }) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width));
  return (
    <View onLayout={onLayout} testID="instrument-trend">
      {width > 0 ? (
        <TrendChart
          samples={trendSamples(history)}
          unit={displayUnit(history.instrument.quantity)}
          width={width}
          height={height}
        />
      ) : null}
    </View>
  );
}
