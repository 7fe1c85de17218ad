import {
  calibrationNoteInputSchema,
  calibrationNoteSchema,
  calibrationNotesSchema,
  categorySettingsSchema,
  categoryWeeksSchema,
  driftChartSchema,
  freshnessSchema,
  itemDetailSchema,
  portfolioSchema,
  scoringSettingsSchema,
  standingsQuerySchema,
  standingsSchema,
  weekQuerySchema,
  whatIfEvidenceSchema,
  whatIfQuerySchema,
} from '../../../shared/schemas/standings.schema';
import { access, route } from '../../lib/route';
import {
  exportStandingsCsv,
  getDriftChart,
  getFreshness,
  getItemDetail,
  getPortfolio,
  getStandings,
  listWeeks,
} from './standings.service';
import { exportStandingsXlsx } from './standings-workbook';
import {
  getCategorySettings,
  getWhatIfEvidence,
  listCalibrationNotes,
  saveCalibrationNote,
  updateCategorySettings,
} from './what-if.service';

const tag = 'standings';
const read = access.category('slug');

export const standingsRoutes = [
  route({
    method: 'get',
    path: '/api/portfolio',
    tag,
    summary:
      "Every category the caller may see with its latest week's figures (or those of `week`) and their recent trend",
    access: access.signedIn,
    query: weekQuerySchema,
    response: portfolioSchema,
    handler: (req, _res, { query }) => getPortfolio(req.actor!, query.week),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/weeks',
    tag,
    summary: 'The weekly snapshots of a category, newest first, with their figures',
    access: read,
    response: categoryWeeksSchema,
    handler: (req) => listWeeks(req.category!),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/standings',
    tag,
    summary: "A page of a week's standings, sorted and filtered on the server",
    access: read,
    query: standingsQuerySchema,
    response: standingsSchema,
    handler: (req, _res, { query }) => getStandings(req.category!, query),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/standings.csv',
    tag,
    summary: 'The filtered and sorted standings (every page) as CSV, safe for spreadsheets',
    access: read,
    query: standingsQuerySchema,
    handler: async (req, res, { query }) => {
      const { fileName, csv } = await exportStandingsCsv(req.category!, query);
      res.setHeader('Content-Type', 'text/csv; charset=utf-8');
      res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
      res.send(csv);
      return undefined;
    },
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/standings.xlsx',
    tag,
    summary:
      'The same view as the CSV export as an .xlsx workbook, with a second sheet of parameters and cautions',
    access: read,
    query: standingsQuerySchema,
    handler: async (req, res, { query }) => {
      const { fileName, body } = await exportStandingsXlsx(req.category!, query);
      res.setHeader('Content-Type', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet');
      res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
      res.send(body);
      return undefined;
    },
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/drift',
    tag,
    summary: 'Naive and smoothed rank of every item of a week, for the drift chart',
    access: read,
    query: weekQuerySchema,
    response: driftChartSchema,
    handler: (req, _res, { query }) => getDriftChart(req.category!, query.week),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/freshness',
    tag,
    summary: "Age of each item's newest review in buckets, and the stale items",
    access: read,
    query: weekQuerySchema,
    response: freshnessSchema,
    handler: (req, _res, { query }) => getFreshness(req.category!, query.week),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/items/:sku',
    tag,
    summary: 'One item: rank timeline over every week, evidence, flags with reasons, helpful reviews',
    access: read,
    query: weekQuerySchema,
    response: itemDetailSchema,
    handler: (req, _res, { query }) => getItemDetail(req.category!, String(req.params.sku), query.week),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/what-if',
    tag,
    summary: "The week's evidence summaries and settings, for re-scoring in the browser",
    access: read,
    query: whatIfQuerySchema,
    response: whatIfEvidenceSchema,
    handler: (req, _res, { query }) => getWhatIfEvidence(req.category!, query, req.actor!),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/settings',
    tag,
    summary: "A category's scoring settings: stored, effective, and whether the caller may change them",
    access: read,
    response: categorySettingsSchema,
    handler: (req) => getCategorySettings(req.category!, req.actor!),
  }),
  route({
    method: 'put',
    path: '/api/categories/:slug/settings',
    tag,
    summary: "Change a category's scoring settings (its managers and administrators; audit-logged)",
    access: access.category('slug', ['manager', 'admin']),
    body: scoringSettingsSchema,
    response: categorySettingsSchema,
    handler: (req, _res, { body }) => updateCategorySettings(req.category!, body, req.actor!, req.ip),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/calibration-notes',
    tag,
    summary: 'Saved calibration results of a category, newest first',
    access: read,
    response: calibrationNotesSchema,
    handler: (req) => listCalibrationNotes(req.category!),
  }),
  route({
    method: 'post',
    path: '/api/categories/:slug/calibration-notes',
    tag,
    summary: 'Save a calibration result as a note on the category',
    access: access.category('slug', ['analyst', 'manager', 'admin']),
    body: calibrationNoteInputSchema,
    response: calibrationNoteSchema,
    status: 201,
    handler: (req, _res, { body }) => saveCalibrationNote(req.category!, body, req.actor!),
  }),
];
