import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import Svg, { Circle, G, Line, Path, Text as SvgText } from 'react-native-svg';
import { fonts } from '@/constants/theme';
import { useTheme } from '@/hooks/use-theme';
import { project, saturationDome, ticks } from '@/shared/charts/ts-diagram';
import { TS_LABEL_FONT, TS_PAD as PAD, tsLabels, tsScales, type TsLine, type TsPoint } from '@/shared/charts/ts-layout';
import { ThemedText } from './themed-text';

export type { TsLine, TsPoint };

/**
 * The cycle on a temperature–entropy chart with the saturation dome (IAPWS-IF97). Measured
 * points are hollow rings, reconciled points filled discs, isentropic end points small crosses:
 * shape says which is which, not colour alone; a measured point read (in part) on another round
 * of the unit has a dashed ring. Labels are placed so none overlaps another (shared/charts
 * ts-layout), with a leader line when moved away from their point.
 */
export function TsChart({
  points,
  lines = [],
  width,
  height,
  testID = 'ts-chart',
}: {
  points: TsPoint[];
  lines?: TsLine[];
  width: number;
  height: number;
  testID?: string;
}) {
  const { colors } = useTheme();
  const dome = useMemo(() => saturationDome(60), []);
  const { xs, ys } = tsScales(points, width, height);
  const sMax = xs.max;
  const tMax = ys.max;
  const labels = useMemo(() => tsLabels(points, lines, dome, width, height), [points, lines, dome, width, height]);
  const labelOf = new Map(points.map((p) => [p.id, p.label]));
  const X = (s: number) => project(s, xs);
  const Y = (T: number) => project(T, ys);
  const domePath = dome.map((p, i) => `${i ? 'L' : 'M'}${X(p.s).toFixed(1)},${Y(p.T).toFixed(1)}`).join(' ') + ' Z';
  const byId = Object.fromEntries(points.map((p) => [p.id, p]));
  const sTicks = ticks(0, sMax / 1000, 6);
  const tTicks = ticks(0, tMax - 273.15, 6);

  return (
    <View
      testID={testID}
      accessibilityLabel="Temperature–entropy chart of the cycle with the saturation dome"
      style={styles.wrap}
    >
      <Svg width={width} height={height}>
        <Path d={domePath} fill={colors.surfaceAlt} stroke={colors.info} strokeWidth={2} testID="ts-dome" />
        {sTicks.map((t) => (
          <G key={`s${t}`}>
            <Line
              x1={X(t * 1000)}
              x2={X(t * 1000)}
              y1={height - PAD.bottom}
              y2={height - PAD.bottom + 5}
              stroke={colors.textMuted}
            />
            <SvgText
              x={X(t * 1000)}
              y={height - PAD.bottom + 18}
              fontSize={11}
              fill={colors.textMuted}
              textAnchor="middle"
              fontFamily={fonts.regular}
            >
              {String(t)}
            </SvgText>
          </G>
        ))}
        {tTicks.map((t) => (
          <G key={`t${t}`}>
            <Line x1={PAD.left - 5} x2={PAD.left} y1={Y(t + 273.15)} y2={Y(t + 273.15)} stroke={colors.textMuted} />
            <SvgText
              x={PAD.left - 8}
              y={Y(t + 273.15) + 4}
              fontSize={11}
              fill={colors.textMuted}
              textAnchor="end"
              fontFamily={fonts.regular}
            >
              {String(t)}
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
        <SvgText
          x={(PAD.left + width - PAD.right) / 2}
          y={height - 6}
          fontSize={12}
          fill={colors.text}
          textAnchor="middle"
          fontFamily={fonts.regular}
        >
          s, kJ/(kg·K)
        </SvgText>
        <SvgText x={12} y={PAD.top + 4} fontSize={12} fill={colors.text} fontFamily={fonts.regular}>
          T, °C
        </SvgText>
        {lines.map((l, i) => {
          const a = byId[l.from];
          const b = byId[l.to];
          if (!a || !b) return null;
          return (
            <Line
              key={i}
              x1={X(a.s)}
              y1={Y(a.T)}
              x2={X(b.s)}
              y2={Y(b.T)}
              stroke={colors.primary}
              strokeWidth={l.dashed ? 1.5 : 2}
              strokeDasharray={l.dashed ? '5,4' : undefined}
            />
          );
        })}
        {points.map((p) =>
          p.kind === 'isentropic' ? (
            <G key={p.id} testID={`ts-point-${p.id}`}>
              <Line
                x1={X(p.s) - 5}
                y1={Y(p.T) - 5}
                x2={X(p.s) + 5}
                y2={Y(p.T) + 5}
                stroke={colors.accent}
                strokeWidth={2}
              />
              <Line
                x1={X(p.s) - 5}
                y1={Y(p.T) + 5}
                x2={X(p.s) + 5}
                y2={Y(p.T) - 5}
                stroke={colors.accent}
                strokeWidth={2}
              />
            </G>
          ) : (
            <G key={p.id} testID={`ts-point-${p.id}`}>
              <Circle
                cx={X(p.s)}
                cy={Y(p.T)}
                r={p.kind === 'measured' ? 6 : 4}
                fill={p.kind === 'reconciled' ? colors.primary : colors.clear}
                stroke={p.kind === 'measured' ? colors.danger : colors.primary}
                strokeWidth={2}
                strokeDasharray={p.borrowed ? '2,2' : undefined}
              />
            </G>
          ),
        )}
        {labels.map((l) =>
          l.placed ? (
            <G key={`label-${l.id}`}>
              {l.leader ? (
                <Line
                  x1={l.leader.x1}
                  y1={l.leader.y1}
                  x2={l.leader.x2}
                  y2={l.leader.y2}
                  stroke={colors.textMuted}
                  strokeWidth={1}
                  testID={`ts-leader-${l.id}`}
                />
              ) : null}
              <SvgText
                x={l.textX}
                y={l.textY + TS_LABEL_FONT * 0.36}
                fontSize={TS_LABEL_FONT}
                fill={colors.text}
                fontFamily={fonts.regular}
                testID={`ts-label-${l.id}`}
              >
                {labelOf.get(l.id) ?? l.id}
              </SvgText>
            </G>
          ) : null,
        )}
      </Svg>
      <View style={styles.legend}>
        <ThemedText variant="caption" muted>
          ○ measured ◌ measured on another round ● reconciled × isentropic end of an expansion
        </ThemedText>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({ wrap: { gap: 4 }, legend: { paddingLeft: PAD.left } });
