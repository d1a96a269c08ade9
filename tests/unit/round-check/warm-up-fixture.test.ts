/**
 * The round check's Web Worker warms up on lib/round-check-warm-up.json instead of importing the
 * demo unit; the fixture must stay what scripts/round-check-warm-up.ts makes from demo/unit.ts,
 * and must be a model the engine accepts (a stale or hand-edited fixture would warm nothing up).
 */
import { validateModel } from '@/shared/cycle';
import fixture from '@/lib/round-check-warm-up.json';
import { warmUpFixture } from '@/scripts/round-check-warm-up';

describe('round-check warm-up fixture', () => {
  it('equals what the generator makes from the demo unit (regenerate: npx tsx scripts/round-check-warm-up.ts)', () => {
    expect(fixture).toEqual(JSON.parse(JSON.stringify(warmUpFixture())));
  });

  it('is a valid cycle model with readings for its instruments, the biased one among them', () => {
    expect(validateModel(fixture.model).ok).toBe(true);
    const t = Date.UTC(2025, 0, 1);
    const readings = fixture.readings.map((r, i) => ({
      id: `w-${i}`,
      tag: r.tag,
      valueSI: r.valueSI,
      time: t,
      order: i,
    }));
    expect(readings.length).toBeGreaterThan(20);
    expect(readings.some((r) => r.tag === fixture.biasTag)).toBe(true);
  });
});
