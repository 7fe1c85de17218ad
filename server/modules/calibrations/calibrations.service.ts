import type { CalibrationResult, ItemInput, ScoringSettings } from '../../../shared/scoring';
import type { CalibrationRequest, CalibrationResponse } from '../../../shared/schemas/calibration.schema';
import type { Actor } from '../../lib/actor';
import { categoryForActor } from '../../middleware/guard';
import { runInWorker } from '../../workers/pool';
import { getWhatIfEvidence } from '../standings/what-if.service';

/**
 * DESIGN §4.8 as a service: the observed ordering against the week's evidence, fitted in a worker thread
 * with the same shared/scoring calibrate the browser uses.
 */
export async function runCalibration(actor: Actor, input: CalibrationRequest): Promise<CalibrationResponse> {
  const category = await categoryForActor(actor, input.category);
  const evidence = await getWhatIfEvidence(
    category,
    { week: input.week } as Parameters<typeof getWhatIfEvidence>[1],
    actor,
  );
  const distinct = [...new Set(input.observed)];
  const result = await runInWorker<CalibrationResult>({
    kind: 'calibrate',
    items: evidence.items as unknown as ItemInput[],
    observed: distinct,
    settings: evidence.settings as unknown as Partial<ScoringSettings>,
    asOf: evidence.asOf,
  });
  return {
    category: category.slug,
    isoWeek: evidence.isoWeek,
    observedCount: input.observed.length,
    duplicateCount: input.observed.length - distinct.length,
    ...result,
    curve: result.curve as unknown as Record<string, unknown>[],
    best: result.best as unknown as Record<string, unknown>,
    strategies: result.strategies as unknown as Record<string, unknown>[],
    unexplained: result.unexplained as unknown as Record<string, unknown>[],
  };
}
