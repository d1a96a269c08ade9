/**
 * Runs the round check off the tap that asked for it. This file serves native builds and the
 * tests: the check runs on the JavaScript thread (./round-check-on-this-thread.ts). The web build
 * uses round-check-runner.web.ts (a Web Worker).
 */
import type { RoundCheckInput } from '@/shared/round-check';
import { roundCheckOnThisThread, type RoundCheckRun } from './round-check-on-this-thread';

export type { RoundCheckRun } from './round-check-on-this-thread';

export function runRoundCheck(input: RoundCheckInput): Promise<RoundCheckRun> {
  return roundCheckOnThisThread(input);
}

/** Gets the check's code ready before it is needed; nothing to do on the JavaScript thread. */
export function warmUpRoundCheck(): void {}
