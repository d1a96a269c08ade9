import { StyleSheet, View } from 'react-native';
import Svg, { Circle, G, Line, Path, Text as SvgText } from 'react-native-svg';
import { fonts } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { dateTickLabel, dateTicks, tickDecimals, valueTicks } from '@/shared/charts/trend-scale';
import { project, type Scale } from '@/shared/charts/ts-diagram';
import { ThemedText } from './themed-text';

export interface TrendSample {
  /** ms since the epoch */
  t: number;
  /** in display units */
  measured: number | null;
  reconciled: number | null;
  /** standard uncertainty of the reconciled value, display units */
  sigma: number | null;
}

const PAD = { left: 56, right: 12, top: 12, bottom: 36 };

/**
 * An instrument's readings against what the balances say it should read: measured values as
 * rings, the reconciled value as a line, and its ±2σ band shaded (coverage k = 2, GUM §6.3).
 */
export function TrendChart({
  samples,
  unit,
  width,
  height,
  testID = 'trend-chart',
}: {
  samples: TrendSample[];
  unit: string;
  width: number;
  height: number;
  testID?: string;
}) {
  const { colors } = useTheme();
  const ys = samples
    .flatMap((s) => [
      s.measured,
      s.reconciled !== null && s.sigma !== null ? s.reconciled + 2 * s.sigma : s.reconciled,
      s.reconciled !== null && s.sigma !== null ? s.reconciled - 2 * s.sigma : null,
    ])
    .filter((v): v is number => v !== null && Number.isFinite(v));
  if (samples.length === 0 || ys.length === 0) {
    return (
      <ThemedText muted testID={`${testID}-empty`}>
        No readings in this period.
      </ThemedText>
    );
  }
  const t0 = Math.min(...samples.map((s) => s.t));
  const t1 = Math.max(...samples.map((s) => s.t));
  const lo = Math.min(...ys);
  const hi = Math.max(...ys);
  const pad = (hi - lo) * 0.08 || Math.abs(hi) * 0.01 || 1;
  const xsc: Scale = { min: t0, max: t1, from: PAD.left, to: width - PAD.right };
  const ysc: Scale = { min: lo - pad, max: hi + pad, from: height - PAD.bottom, to: PAD.top };
  const X = (t: number) => project(t, xsc);
  const Y = (v: number) => project(v, ysc);
  const withBand = samples.filter((s) => s.reconciled !== null && s.sigma !== null);
  const band =
    withBand.length > 1
      ? withBand
          .map((s, i) => `${i ? 'L' : 'M'}${X(s.t).toFixed(1)},${Y(s.reconciled! + 2 * s.sigma!).toFixed(1)}`)
          .join(' ') +
        ' ' +
        [...withBand]
          .reverse()
          .map((s) => `L${X(s.t).toFixed(1)},${Y(s.reconciled! - 2 * s.sigma!).toFixed(1)}`)
          .join(' ') +
        ' Z'
      : null;
  const rec = samples.filter((s) => s.reconciled !== null);
  const recPath = rec.map((s, i) => `${i ? 'L' : 'M'}${X(s.t).toFixed(1)},${Y(s.reconciled!).toFixed(1)}`).join(' ');
  const yTicks = valueTicks(lo - pad, hi + pad, 5);
  const yDecimals = tickDecimals(yTicks);
  const xTicks = dateTicks(t0, t1, 4);

  return (
    <View
      testID={testID}
      accessibilityLabel={`Trend of readings in ${unit} against reconciled values`}
      style={styles.wrap}
    >
      <Svg width={width} height={height}>
        {band ? <Path d={band} fill={colors.surfaceAlt} stroke="none" testID={`${testID}-band`} /> : null}
        {rec.length > 1 ? (
          <Path d={recPath} stroke={colors.primary} strokeWidth={2} fill="none" testID={`${testID}-reconciled`} />
        ) : null}
        {samples.map((s, i) =>
          s.measured === null ? null : (
            <Circle
              key={i}
              cx={X(s.t)}
              cy={Y(s.measured)}
              r={3.5}
              fill={colors.clear}
              stroke={colors.accent}
              strokeWidth={1.5}
            />
          ),
        )}
        {yTicks.map((v) => (
          <G key={v} testID={`${testID}-value-tick`}>
            <Line x1={PAD.left - 4} x2={PAD.left} y1={Y(v)} y2={Y(v)} stroke={colors.textMuted} />
            <SvgText
              x={PAD.left - 6}
              y={Y(v) + 4}
              fontSize={11}
              textAnchor="end"
              fill={colors.textMuted}
              fontFamily={fonts.regular}
            >
              {v.toFixed(yDecimals)}
            </SvgText>
          </G>
        ))}
        <Line
          x1={PAD.left}
          x2={width - PAD.right}
          y1={height - PAD.bottom}
          y2={height - PAD.bottom}
          stroke={colors.text}
        />
        <Line x1={PAD.left} x2={PAD.left} y1={PAD.top} y2={height - PAD.bottom} stroke={colors.text} />
        {xTicks.ticks.map((t, n) => (
          <G key={t} testID={`${testID}-date-tick`}>
            <Line x1={X(t)} x2={X(t)} y1={height - PAD.bottom} y2={height - PAD.bottom + 4} stroke={colors.textMuted} />
            <SvgText
              x={X(t)}
              y={height - PAD.bottom + 16}
              fontSize={11}
              textAnchor={xTicks.ticks.length === 1 ? 'start' : 'middle'}
              fill={colors.textMuted}
              fontFamily={fonts.regular}
            >
              {dateTickLabel(t, xTicks.stepMs, n === 0)}
            </SvgText>
          </G>
        ))}
        <SvgText x={4} y={PAD.top + 4} fontSize={11} fill={colors.text} fontFamily={fonts.regular}>
          {unit}
        </SvgText>
      </Svg>
      <ThemedText variant="caption" muted style={styles.legend}>
        ○ reading — reconciled shaded: reconciled ± 2σ
      </ThemedText>
    </View>
  );
}

const styles = StyleSheet.create({ wrap: { gap: 4 }, legend: { paddingLeft: PAD.left } });
