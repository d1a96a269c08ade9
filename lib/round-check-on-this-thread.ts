/**
 * The round check on the JavaScript thread, after a zero-delay timer so the screen paints
 * "Checking…" first: what native builds and the tests run, and the web build's fallback when no
 * worker can be started (./round-check-runner.ts, ./round-check-runner.web.ts).
 */
import { checkRound, type RoundCheckInput, type RoundCheck } from '@/shared/round-check';

export interface RoundCheckRun {
  roundCheck: RoundCheck;
  /** from asking to having the answer, ms */
  ms: number;
  where: 'main thread' | 'worker';
}

export function roundCheckOnThisThread(input: RoundCheckInput): Promise<RoundCheckRun> {
  return new Promise((resolve, reject) => {
    setTimeout(() => {
      try {
        const t0 = performance.now();
        const roundCheck = checkRound(input);
        resolve({ roundCheck, ms: performance.now() - t0, where: 'main thread' });
      } catch (e) {
        reject(e instanceof Error ? e : new Error(String(e)));
      }
    }, 0);
  });
}
