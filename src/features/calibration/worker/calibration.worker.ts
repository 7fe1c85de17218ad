/// <reference lib="webworker" />
import { calibrate } from '../../../../shared/scoring';
import type { CalibrationRequestMessage, CalibrationWorkerMessage } from './messages';

/**
 * The calibration screen's background thread: the same shared engine as POST /api/calibrations, so the
 * tab stays responsive and the result is the server's. Progress goes out at most once per whole percent.
 */
const scope = self as unknown as DedicatedWorkerGlobalScope;

scope.onmessage = (event: MessageEvent<CalibrationRequestMessage>) => {
  const { items, observed, settings, asOf, unexplainedCount } = event.data;
  const post = (message: CalibrationWorkerMessage) => scope.postMessage(message);
  let last = -1;
  try {
    const result = calibrate(items, observed, settings, {
      asOf,
      unexplainedCount,
      onProgress: (share) => {
        const percent = Math.floor(share * 100);
        if (percent > last) {
          last = percent;
          post({ kind: 'progress', share });
        }
      },
    });
    post({ kind: 'done', result });
  } catch (err) {
    post({ kind: 'failed', message: err instanceof Error ? err.message : String(err) });
  }
};
