/**
 * The round check on the web: in a Web Worker, so a check (about 60 ms on a phone-class
 * processor, several times that the first time, while the engine's code compiles) never holds
 * up a tap. Falls back to the page's thread when a worker cannot be started.
 */
import type { RoundCheckInput } from '@/shared/round-check';
import { roundCheckOnThisThread as mainThread, type RoundCheckRun } from './round-check-on-this-thread';

export type { RoundCheckRun } from './round-check-on-this-thread';

type Reply =
  | { id: number; ok: true; roundCheck: RoundCheckRun['roundCheck'] | null; ms: number }
  | { id: number; ok: false; message: string; ms: number };

let worker: Worker | null | undefined;
let seq = 0;
const waiting = new Map<number, { resolve(r: Reply): void; reject(e: Error): void }>();

function theWorker(): Worker | null {
  if (worker !== undefined) return worker;
  try {
    const w = new Worker(new URL('./round-check-runner.worker', window.location.href));
    w.onmessage = (e: MessageEvent<Reply>) => {
      const p = waiting.get(e.data.id);
      if (!p) return;
      waiting.delete(e.data.id);
      p.resolve(e.data);
    };
    w.onerror = (e) => {
      // a worker that cannot load or crashes: everything waiting goes to the page's thread
      worker = null;
      const err = new Error(`the round check's worker failed: ${e.message || 'it could not be loaded'}`);
      for (const p of waiting.values()) p.reject(err);
      waiting.clear();
    };
    worker = w;
  } catch {
    worker = null;
  }
  return worker;
}

function ask(kind: 'roundCheck' | 'warm', input?: RoundCheckInput): Promise<Reply> | null {
  const w = theWorker();
  if (!w) return null;
  const id = ++seq;
  return new Promise<Reply>((resolve, reject) => {
    waiting.set(id, { resolve, reject });
    w.postMessage({ id, kind, input });
  });
}

export async function runRoundCheck(input: RoundCheckInput): Promise<RoundCheckRun> {
  const t0 = performance.now();
  const reply = ask('roundCheck', input);
  if (!reply) return mainThread(input);
  let r: Reply;
  try {
    r = await reply;
  } catch {
    return mainThread(input);
  }
  if (!r.ok) throw new Error(r.message);
  return { roundCheck: r.roundCheck!, ms: performance.now() - t0, where: 'worker' };
}

/** Starts the worker and has it compile the engine on a demo round, once. */
let warmed = false;
export function warmUpRoundCheck(): void {
  if (warmed) return;
  warmed = true;
  void ask('warm')?.catch(() => undefined);
}
