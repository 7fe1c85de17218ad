import ExcelJS from 'exceljs';
import type { StandingsQuery, StandingsRow } from '../../../shared/schemas/standings.schema';
import {
  cautionText,
  fieldLabels,
  priorWeightApplied,
  priorWeightStrategyNames,
} from '../../../shared/vocabulary';
import type { CategoryRef } from '../categories/categories.service';
import { csvColumns, standingsExport, type ExportColumn, type ExportContext } from './standings.service';

export const workbookSheets = { standings: 'Standings', parameters: 'Parameters' } as const;

function cellOf(column: ExportColumn<StandingsRow>, row: StandingsRow): string | number | null {
  const raw = typeof column.value === 'function' ? column.value(row) : row[column.value];
  if (raw === null || raw === undefined || raw === '') return null;
  // Text stays text: a workbook cell holds a title such as "=SUM(A1)" as a string, never as a formula.
  return column.numeric ? Number(raw) : String(raw);
}

/** The parameters of the week, one per row, in the words of the settings form. */
function parameterRows({ isoWeek, category, params }: ExportContext): [string, string | number][] {
  return [
    ['Week', isoWeek],
    ['Category', category],
    ['As of', params.asOf],
    ['Prior mean C', params.C],
    ['Prior mean strategy', params.priorMeanStrategy],
    ['Prior weight m', params.m],
    ['Prior weight strategy asked for', priorWeightStrategyNames[params.priorWeightStrategy]],
    ['Prior weight strategy applied', priorWeightApplied(params)],
    [fieldLabels.z!, params.z],
    [fieldLabels.helpfulZ!, params.helpfulZ],
    [fieldLabels.halfLifeDays!, params.halfLifeDays],
    [fieldLabels.recentWindowDays!, params.recentWindowDays],
    [fieldLabels.staleAfterDays!, params.staleAfterDays],
    [fieldLabels.thinEvidenceThreshold!, params.thinEvidenceThreshold],
    [fieldLabels.clusterWindowDays!, params.clusterWindowDays],
    [fieldLabels.clusterBaselineDays!, params.clusterBaselineDays],
    [fieldLabels.clusterPValue!, params.clusterPValue],
    [fieldLabels.clusterMinCount!, params.clusterMinCount],
    [fieldLabels.clusterPhrases!, params.clusterPhrases.join('; ')],
    [fieldLabels.moverThreshold!, params.moverThreshold],
    [fieldLabels.topOverlapDepth!, params.topOverlapDepth],
    [fieldLabels.rboP!, params.rboP],
  ];
}

/**
 * The standings view as an .xlsx workbook: the first sheet has exactly the rows and columns of the CSV
 * export, the second the week's parameters and the cautions of DESIGN §7.
 */
export async function standingsWorkbook(
  rows: readonly StandingsRow[],
  columns: readonly ExportColumn<StandingsRow>[],
  context: ExportContext,
): Promise<Buffer> {
  const book = new ExcelJS.Workbook();
  book.creator = 'Ballast';
  // The week's as-of date, so the same view exported twice gives the same file contents.
  book.created = new Date(context.params.asOf);
  book.modified = book.created;

  const sheet = book.addWorksheet(workbookSheets.standings, { views: [{ state: 'frozen', ySplit: 1 }] });
  sheet.addRow(columns.map((c) => c.header)).font = { bold: true };
  for (const row of rows) sheet.addRow(columns.map((c) => cellOf(c, row)));
  columns.forEach((c, k) => {
    const column = sheet.getColumn(k + 1);
    column.width = Math.min(40, Math.max(10, c.header.length + 2));
    if (c.numeric) column.numFmt = '0.####';
  });

  const about = book.addWorksheet(workbookSheets.parameters);
  about.addRow(['Parameter', 'Value']).font = { bold: true };
  for (const entry of parameterRows(context)) about.addRow(entry);
  about.addRow([]);
  about.addRow(['Read with care']).font = { bold: true };
  for (const line of cautionText) about.addRow([line]);
  about.getColumn(1).width = 36;
  about.getColumn(2).width = 40;

  return Buffer.from(await book.xlsx.writeBuffer());
}

/** The same view as the CSV export (every page, filtered and sorted), as a workbook. */
export async function exportStandingsXlsx(
  category: CategoryRef,
  query: StandingsQuery,
): Promise<{ fileName: string; body: Buffer }> {
  const { fileName, rows, context } = await standingsExport(category, query, 'xlsx');
  return { fileName, body: await standingsWorkbook(rows, csvColumns(context), context) };
}
