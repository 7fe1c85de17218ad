import { z } from 'zod';
import {
  alertListQuerySchema,
  alertListSchema,
  alertPreferencesSchema,
  alertRuleSchema,
  myAlertSettingsSchema,
  setAlertChoiceSchema,
  setAlertRuleSchema,
} from '../../../shared/schemas/alerts.schema';
import { access, route } from '../../lib/route';
import {
  categoryAlerts,
  myAlerts,
  myAlertSettings,
  setAlertChoice,
  setAlertPreferences,
} from './alert-history.service';
import { categoryRules, resetCategoryRule, setCategoryRule } from './alert-rules.service';

const tag = 'alerts';
const ruleEditors = ['manager', 'admin'] as const;

export const alertRoutes = [
  route({
    method: 'get',
    path: '/api/categories/:slug/alert-rules',
    tag,
    summary: "A category's alert rules as they apply (its own choices over the defaults)",
    access: access.category('slug'),
    response: z.array(alertRuleSchema),
    handler: (req) => categoryRules(req.category!.id),
  }),
  route({
    method: 'put',
    path: '/api/categories/:slug/alert-rules/:rule',
    tag,
    summary: 'Change one alert rule of a category (its managers and administrators; audit-logged)',
    access: access.category('slug', ruleEditors),
    body: setAlertRuleSchema,
    response: z.array(alertRuleSchema),
    handler: (req, _res, { body }) =>
      setCategoryRule(req.category!, String(req.params.rule), body, req.actor!, req.ip),
  }),
  route({
    method: 'delete',
    path: '/api/categories/:slug/alert-rules/:rule',
    tag,
    summary: 'Put one alert rule of a category back to its default (audit-logged)',
    access: access.category('slug', ruleEditors),
    response: z.array(alertRuleSchema),
    handler: (req) => resetCategoryRule(req.category!, String(req.params.rule), req.actor!, req.ip),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/alerts',
    tag,
    summary: 'Alert history of a category, newest first, each with the evidence that raised it',
    access: access.category('slug'),
    query: alertListQuerySchema,
    response: alertListSchema,
    handler: (req, _res, { query }) => categoryAlerts(req.category!.id, query),
  }),
  route({
    method: 'get',
    path: '/api/me/alerts',
    tag,
    summary: "The caller's alert history and what became of each alert's mail",
    access: access.signedIn,
    query: alertListQuerySchema,
    response: alertListSchema,
    handler: (req, _res, { query }) => myAlerts(req.actor!, query),
  }),
  route({
    method: 'get',
    path: '/api/me/alert-settings',
    tag,
    summary: "The caller's quiet hours and which alerts they receive",
    access: access.signedIn,
    response: myAlertSettingsSchema,
    handler: (req) => myAlertSettings(req.actor!),
  }),
  route({
    method: 'put',
    path: '/api/me/alert-settings/choices',
    tag,
    summary: 'Receive or stop receiving one alert rule of one category',
    access: access.signedIn,
    body: setAlertChoiceSchema,
    response: myAlertSettingsSchema,
    handler: (req, _res, { body }) => setAlertChoice(req.actor!, body, req.ip),
  }),
  route({
    method: 'put',
    path: '/api/me/alert-settings/quiet-hours',
    tag,
    summary: "Set the caller's time zone and quiet hours for alert mail",
    access: access.signedIn,
    body: alertPreferencesSchema,
    response: myAlertSettingsSchema,
    handler: (req, _res, { body }) => setAlertPreferences(req.actor!, body, req.ip),
  }),
];
