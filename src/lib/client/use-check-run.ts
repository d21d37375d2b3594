// One run of a Slope check panel (sensitivity, broadband shift) in its worker: running, the newest result, a problem
// in words, Cancel. A new run replaces the one going; the result belongs to one decomposition, so a change of
// `resetOn` (another recording or run) ends the run and clears it; leaving the screen ends a run still going.
import { useEffect, useRef, useState } from 'react';
import { SlopeCheckCancelledError } from './slope-check';

export interface CheckRun<R> {
  running: boolean;
  result: R | null;
  problem: string | null;
  /** A refusal before anything runs (bad input), in words. */
  refuse: (problem: string) => void;
  /** Runs `work` with an abort signal; a run replaced, cleared or cancelled meanwhile says nothing more. */
  start: (work: (signal: AbortSignal) => Promise<R>) => Promise<void>;
  cancel: () => void;
}

export function useCheckRun<R>(resetOn: readonly unknown[], onResult?: (result: R | null) => void): CheckRun<R> {
  const [running, setRunning] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const [result, setResult] = useState<R | null>(null);
  const abort = useRef<AbortController | null>(null);
  useEffect(() => {
    abort.current?.abort();
    abort.current = null;
    setRunning(false);
    setResult(null);
    onResult?.(null);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, resetOn);
  useEffect(() => () => abort.current?.abort(), []);

  const start = async (work: (signal: AbortSignal) => Promise<R>) => {
    abort.current?.abort();
    const controller = new AbortController();
    abort.current = controller;
    setRunning(true);
    setProblem(null);
    try {
      const r = await work(controller.signal);
      if (abort.current === controller) {
        setResult(r);
        onResult?.(r);
      }
    } catch (err) {
      if (abort.current === controller) setProblem(err instanceof SlopeCheckCancelledError ? 'Cancelled; the previous result stays.' : err instanceof Error ? err.message : String(err));
    } finally {
      if (abort.current === controller) {
        abort.current = null;
        setRunning(false);
      }
    }
  };
  return { running, result, problem, refuse: setProblem, start, cancel: () => abort.current?.abort() };
}
