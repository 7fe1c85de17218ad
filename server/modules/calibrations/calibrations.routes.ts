import {
  calibrationRequestSchema,
  calibrationResponseSchema,
} from '../../../shared/schemas/calibration.schema';
import { route } from '../../lib/route';
import { withHeavySlot } from '../../workers/pool';
import { runCalibration } from './calibrations.service';

export const calibrationRoutes = [
  route({
    method: 'post',
    path: '/api/calibrations',
    tag: 'calibration',
    summary:
      "Fit the prior weight to an observed ordering (best first) against a category's week; any role that may read the category, and API tokens",
    access: { kind: 'roles', roles: 'any', tokens: true },
    body: calibrationRequestSchema,
    response: calibrationResponseSchema,
    handler: (req, _res, { body }) => withHeavySlot(req.actor!, () => runCalibration(req.actor!, body)),
  }),
];
