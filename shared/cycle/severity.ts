/**
 * One direction and one label table for a finding's severity and a work order's priority:
 * 1 is the most urgent, 3 the least (as maintenance backlogs number priorities, common practice).
 */
export type Level = 1 | 2 | 3;

export const URGENT: Level = 1;
export const ATTEND: Level = 2;
export const NOTE: Level = 3;

/** The words and the shape each level is shown with (never colour alone). */
export const LEVEL_LABELS: Readonly<Record<Level, { word: string; phrase: string; glyph: string }>> = Object.freeze({
  1: { word: 'Urgent', phrase: 'urgent', glyph: '◆' },
  2: { word: 'Soon', phrase: 'attend to', glyph: '▲' },
  3: { word: 'Note', phrase: 'note', glyph: '●' },
});

/** The more urgent of two levels. */
export const moreUrgent = (a: Level, b: Level): Level => (a < b ? a : b);

/** Severity of a finding on equipment of criticality 1–3: urgent on the most critical, else attend to. */
export const severityForCriticality = (criticality: number): Level => (criticality >= 3 ? URGENT : ATTEND);
