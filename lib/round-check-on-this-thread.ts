/**
 * The round check on the JavaScript thread, after a zero-delay timer so the screen paints
 * "Checking…" first: what native builds and the tests run, and the web build's fallback when no
 * worker can be started (./review-runner.ts, ./review-runner.web.ts).
 */
import { reviewRound, type ReviewInput, type RoundReview } from '@/shared/round-check';

export interface ReviewRun {
  review: RoundReview;
  /** from asking to having the answer, ms */
  ms: number;
  where: 'main thread' | 'worker';
}

export function reviewOnThisThread(input: ReviewInput): Promise<ReviewRun> {
  return new Promise((resolve, reject) => {
    setTimeout(() => {
      try {
        const t0 = performance.now();
        const review = reviewRound(input);
        resolve({ review, ms: performance.now() - t0, where: 'main thread' });
      } catch (e) {
        reject(e instanceof Error ? e : new Error(String(e)));
      }
    }, 0);
  });
}
