import { readFileSync } from 'node:fs';
import path from 'node:path';
import Handlebars from 'handlebars';
import type { DigestKeyFigure, DigestSummary } from '../../shared/schemas/digests.schema';

export type DigestMailView = {
  summary: DigestSummary;
  heading: string;
  weekRange: string;
  preheader: string;
  fileName: string;
  /** "3 pages" */
  pages: string;
  /** What the attached PDF holds. */
  contents: string;
  recipient: string;
  targetLabel: string;
  unsubscribeUrl: string;
};

const dir = import.meta.dirname;
// Separate instances: the HTML one escapes every value, the text one must not (no markup in plain text).
const htmlEngine = Handlebars.create();
const textEngine = Handlebars.create();
const html = htmlEngine.compile(readFileSync(path.join(dir, 'digest.html.hbs'), 'utf8'), { strict: false });
const text = textEngine.compile(readFileSync(path.join(dir, 'digest.text.hbs'), 'utf8'), { noEscape: true });

function rows(figures: DigestKeyFigure[], perRow: number): DigestKeyFigure[][] {
  const out: DigestKeyFigure[][] = [];
  for (let i = 0; i < figures.length; i += perRow) out.push(figures.slice(i, i + perRow));
  return out;
}

export function renderDigestMail(view: DigestMailView): { html: string; text: string } {
  return {
    html: html({ ...view, figureRows: rows(view.summary.keyFigures, 3) }),
    text: text(view).replace(/\n{3,}/g, '\n\n'),
  };
}

export type AlertMailView = {
  subject: string;
  heading: string;
  groups: {
    category: string;
    alerts: { ruleName: string; headline: string; reason: string; phrases: string; itemUrl: string }[];
  }[];
  held: string;
  historyUrl: string;
  settingsUrl: string;
  caution: string;
};

const alertHtml = htmlEngine.compile(readFileSync(path.join(dir, 'alerts.html.hbs'), 'utf8'), {
  strict: false,
});
const alertText = textEngine.compile(readFileSync(path.join(dir, 'alerts.text.hbs'), 'utf8'), {
  noEscape: true,
});

export function renderAlertMail(view: AlertMailView): { html: string; text: string } {
  return { html: alertHtml(view), text: alertText(view).replace(/\n{3,}/g, '\n\n') };
}
