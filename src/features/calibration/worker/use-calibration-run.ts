import { useCallback, useEffect, useRef, useState } from 'react';
import type { CalibrationResult } from '../../../../shared/scoring';
import type { CalibrationRequestMessage, CalibrationWorkerMessage } from './messages';

export type CalibrationRun =
  { state: 'idle' } | { state: 'running'; share: number } | { state: 'failed'; message: string };

/**
 * Runs one calibration at a time in a Web Worker. Cancel ends the worker outright (the engine needs no
 * cooperation), and a new run or leaving the page does the same to the previous one.
 */
export function useCalibrationRun(onDone: (result: CalibrationResult) => void) {
  const [run, setRun] = useState<CalibrationRun>({ state: 'idle' });
  const worker = useRef<Worker | null>(null);
  const done = useRef(onDone);
  useEffect(() => {
    done.current = onDone;
  }, [onDone]);

  const stop = useCallback(() => {
    worker.current?.terminate();
    worker.current = null;
  }, []);

  const start = useCallback(
    (request: CalibrationRequestMessage) => {
      stop();
      const w = new Worker(new URL('./calibration.worker.ts', import.meta.url), { type: 'module' });
      worker.current = w;
      setRun({ state: 'running', share: 0 });
      w.onmessage = (event: MessageEvent<CalibrationWorkerMessage>) => {
        if (worker.current !== w) return;
        const message = event.data;
        if (message.kind === 'progress') setRun({ state: 'running', share: message.share });
        else {
          stop();
          if (message.kind === 'done') {
            setRun({ state: 'idle' });
            done.current(message.result);
          } else setRun({ state: 'failed', message: message.message });
        }
      };
      w.onerror = (event) => {
        if (worker.current !== w) return;
        stop();
        setRun({ state: 'failed', message: event.message || 'The calibration stopped unexpectedly.' });
      };
      w.postMessage(request);
    },
    [stop],
  );

  const cancel = useCallback(() => {
    stop();
    setRun({ state: 'idle' });
  }, [stop]);

  useEffect(() => stop, [stop]);
  return { run, start, cancel };
}
