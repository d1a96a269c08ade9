import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import Svg, { Circle, G, Line, Path, Text as SvgText } from 'react-native-svg';
import { fonts } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { project, saturationDome, ticks, type Scale } from '@/shared/charts/ts-diagram';
import { ThemedText } from './themed-text';

export interface TsPoint {
  id: string;
  label: string;
  /** K */
  T: number;
  /** J/(kg·K) */
  s: number;
  kind: 'measured' | 'reconciled' | 'isentropic';
}

export interface TsLine {
  from: string;
  to: string;
  /** An expansion drawn dashed to its isentropic end point. */
  dashed?: boolean;
}

const PAD = { left: 52, right: 16, top: 16, bottom: 40 };

/**
 * The cycle on a temperature–entropy chart with the saturation dome (IAPWS-IF97). Measured
 * points are hollow rings, reconciled points filled discs, isentropic end points small crosses:
 * shape says which is which, not colour alone.
 */
export function TsChart({ points, lines = [], width, height, testID = 'ts-chart' }: { points: TsPoint[]; lines?: TsLine[]; width: number; height: number; testID?: string }) {
  const { colors } = useTheme();
  const dome = useMemo(() => saturationDome(60), []);
  const sMax = Math.max(9000, ...points.map((p) => p.s + 300));
  const tMax = Math.max(673.15, ...points.map((p) => p.T + 25));
  const xs: Scale = { min: 0, max: sMax, from: PAD.left, to: width - PAD.right };
  const ys: Scale = { min: 273.15, max: tMax, from: height - PAD.bottom, to: PAD.top };
  const X = (s: number) => project(s, xs);
  const Y = (T: number) => project(T, ys);
  const domePath = dome.map((p, i) => `${i ? 'L' : 'M'}${X(p.s).toFixed(1)},${Y(p.T).toFixed(1)}`).join(' ') + ' Z';
  const byId = Object.fromEntries(points.map((p) => [p.id, p]));
  const sTicks = ticks(0, sMax / 1000, 6);
  const tTicks = ticks(0, tMax - 273.15, 6);

  return (
    <View testID={testID} accessibilityLabel="Temperature–entropy chart of the cycle with the saturation dome" style={styles.wrap}>
      <Svg width={width} height={height}>
        <Path d={domePath} fill={colors.surfaceAlt} stroke={colors.info} strokeWidth={2} testID="ts-dome" />
        {sTicks.map((t) => (
          <G key={`s${t}`}>
            <Line x1={X(t * 1000)} x2={X(t * 1000)} y1={height - PAD.bottom} y2={height - PAD.bottom + 5} stroke={colors.textMuted} />
            <SvgText x={X(t * 1000)} y={height - PAD.bottom + 18} fontSize={11} fill={colors.textMuted} textAnchor="middle" fontFamily={fonts.regular}>{String(t)}</SvgText>
          </G>
        ))}
        {tTicks.map((t) => (
          <G key={`t${t}`}>
            <Line x1={PAD.left - 5} x2={PAD.left} y1={Y(t + 273.15)} y2={Y(t + 273.15)} stroke={colors.textMuted} />
            <SvgText x={PAD.left - 8} y={Y(t + 273.15) + 4} fontSize={11} fill={colors.textMuted} textAnchor="end" fontFamily={fonts.regular}>{String(t)}</SvgText>
          </G>
        ))}
        <Line x1={PAD.left} x2={width - PAD.right} y1={height - PAD.bottom} y2={height - PAD.bottom} stroke={colors.text} />
        <Line x1={PAD.left} x2={PAD.left} y1={PAD.top} y2={height - PAD.bottom} stroke={colors.text} />
        <SvgText x={(PAD.left + width - PAD.right) / 2} y={height - 6} fontSize={12} fill={colors.text} textAnchor="middle" fontFamily={fonts.regular}>s, kJ/(kg·K)</SvgText>
        <SvgText x={12} y={PAD.top + 4} fontSize={12} fill={colors.text} fontFamily={fonts.regular}>T, °C</SvgText>
        {lines.map((l, i) => {
          const a = byId[l.from];
          const b = byId[l.to];
          if (!a || !b) return null;
          return <Line key={i} x1={X(a.s)} y1={Y(a.T)} x2={X(b.s)} y2={Y(b.T)} stroke={colors.primary} strokeWidth={l.dashed ? 1.5 : 2} strokeDasharray={l.dashed ? '5,4' : undefined} />;
        })}
        {points.map((p) =>
          p.kind === 'isentropic' ? (
            <G key={p.id} testID={`ts-point-${p.id}`}>
              <Line x1={X(p.s) - 5} y1={Y(p.T) - 5} x2={X(p.s) + 5} y2={Y(p.T) + 5} stroke={colors.accent} strokeWidth={2} />
              <Line x1={X(p.s) - 5} y1={Y(p.T) + 5} x2={X(p.s) + 5} y2={Y(p.T) - 5} stroke={colors.accent} strokeWidth={2} />
            </G>
          ) : (
            <G key={p.id} testID={`ts-point-${p.id}`}>
              <Circle cx={X(p.s)} cy={Y(p.T)} r={p.kind === 'measured' ? 6 : 4} fill={p.kind === 'reconciled' ? colors.primary : colors.clear} stroke={p.kind === 'measured' ? colors.danger : colors.primary} strokeWidth={2} />
              {p.kind === 'reconciled' ? (
                <SvgText x={X(p.s) + 8} y={Y(p.T) - 6} fontSize={11} fill={colors.text} fontFamily={fonts.regular}>{p.label}</SvgText>
              ) : null}
            </G>
          ),
        )}
      </Svg>
      <View style={styles.legend}>
        <ThemedText variant="caption" muted>○ measured   ● reconciled   × isentropic end of an expansion</ThemedText>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({ wrap: { gap: 4 }, legend: { paddingLeft: PAD.left } });
