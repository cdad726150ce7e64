import {
  decisionLabels,
  decisionReasonLabels,
  type EvaluationReport,
  type ReportChart,
} from '@evalon/contracts';
import { formatMoney } from '@evalon/deposits';
import { complicationGradeLabels } from '@evalon/evidence';
import * as echarts from 'echarts';
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';

/** Chart size in PDF points (A4 is 595 × 842 pt; 50 pt margins leave 495 pt of width). */
const chartWidth = 495;
const chartHeight = 230;

/**
 * One chart as SVG, rendered on the server by the same library and options as the browser
 * (server-side rendering, SVG renderer: no canvas, no browser).
 */
export function chartSvg(chart: ReportChart, width = chartWidth, height = chartHeight): string {
  const instance = echarts.init(null, null, { renderer: 'svg', ssr: true, width, height });
  try {
    instance.setOption(chart.option);
    return instance.renderToSVGString();
  } finally {
    instance.dispose();
  }
}

const ink = '#191c1d';
const muted = '#444748';
const primary = '#1d5e66';

/**
 * The evaluation report as an A4 PDF (pdfkit, built-in Helvetica): heading, caution, decision,
 * each chart (SVG placed with svg-to-pdfkit) with its text alternative and table, summary
 * figures and the costs seen in Evalon. `at` is the moment the report was produced.
 */
export function renderReportPdf(report: EvaluationReport, at: Date): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margin: 50,
    info: {
      Title: `Evaluation report ${report.loan.reference}`,
      Author: 'Evalon',
      CreationDate: at,
      ModDate: at,
    },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  const left = doc.page.margins.left;
  const width = doc.page.width - left - doc.page.margins.right;
  const bottom = () => doc.page.height - doc.page.margins.bottom;
  const ensure = (space: number) => {
    if (doc.y + space > bottom()) doc.addPage();
  };
  const heading = (text: string) => {
    ensure(60);
    doc.moveDown(0.8).fillColor(primary).font('Helvetica-Bold').fontSize(13).text(text, left);
    doc.moveDown(0.3).fillColor(ink).font('Helvetica').fontSize(10);
  };
  const fact = (label: string, value: string) => {
    doc.font('Helvetica-Bold').text(`${label}: `, left, doc.y, { continued: true });
    doc.font('Helvetica').text(value);
  };
  const table = (columns: string[], rows: (string | number)[][], maxRows = 20) => {
    const colWidth = width / columns.length;
    const row = (cells: (string | number)[], bold: boolean) => {
      ensure(16);
      const y = doc.y;
      doc.font(bold ? 'Helvetica-Bold' : 'Helvetica').fontSize(9);
      cells.forEach((cell, i) =>
        doc.text(String(cell), left + i * colWidth, y, { width: colWidth - 6, lineBreak: false }),
      );
      doc.y = y + 14;
    };
    row(columns, true);
    for (const r of rows.slice(0, maxRows)) row(r, false);
    if (rows.length > maxRows) {
      doc
        .font('Helvetica-Oblique')
        .text(`… and ${rows.length - maxRows} more rows (see CSV).`, left);
    }
    doc.fontSize(10).font('Helvetica').x = left;
  };

  const { loan, metrics, costs } = report;
  doc.fillColor(primary).font('Helvetica-Bold').fontSize(18).text('Evaluation report');
  doc.moveDown(0.2).fillColor(muted).font('Helvetica').fontSize(10);
  doc.text(
    `Loan ${loan.reference}. Produced ${at.toISOString().slice(0, 16).replace('T', ' ')} UTC.`,
  );
  doc.moveDown(0.6).fillColor(ink);
  fact('Hospital', loan.hospitalName);
  fact('Lender', loan.lenderName);
  fact('Equipment', loan.units.map((u) => `${u.modelName} (${u.serialNumber})`).join('; '));
  fact('Cases', String(metrics.cases));

  // The caution sits on the first page, boxed, so no reader misses it.
  doc.moveDown(0.6);
  const boxTop = doc.y;
  doc.fontSize(9).fillColor(ink);
  const cautionHeight = doc.heightOfString(report.caution, { width: width - 16 });
  doc.rect(left, boxTop, width, cautionHeight + 14).fillAndStroke('#fdf3e1', '#8a4f1d');
  doc.fillColor(ink).text(report.caution, left + 8, boxTop + 7, { width: width - 16 });
  doc.y = boxTop + cautionHeight + 20;
  doc.fontSize(10);

  heading('Hospital’s decision');
  if (metrics.decision) {
    fact('Decision', decisionLabels[metrics.decision.decision]);
    fact(
      'Reasons',
      metrics.decision.reasons.map((r) => decisionReasonLabels[r]).join('; ') || 'none given',
    );
    if (metrics.decision.note) fact('Note', metrics.decision.note);
    fact(
      'Recorded',
      `${metrics.decision.decidedAt.slice(0, 10)}${metrics.decision.decidedByName ? ` by ${metrics.decision.decidedByName}` : ''}`,
    );
  } else {
    doc.text('Not recorded yet.');
  }

  for (const chart of report.charts) {
    // Keep the title with its chart.
    ensure(chartHeight + 80);
    heading(chart.title);
    SVGtoPDF(doc, chartSvg(chart), left, doc.y, {
      width: chartWidth,
      height: chartHeight,
      assumePt: true,
    });
    doc.y += chartHeight + 6;
    doc.fillColor(muted).fontSize(9).text(chart.summary, left, doc.y, { width });
    doc.moveDown(0.4).fillColor(ink);
    table(chart.table.columns, chart.table.rows);
  }

  heading('Summary figures');
  const line = (label: string, s: EvaluationReport['metrics']['operativeMinutes'], unit: string) =>
    s
      ? [
          label,
          s.n,
          `${s.median.toFixed(1)} ${unit}`,
          `${s.iqr[0].toFixed(1)}–${s.iqr[1].toFixed(1)}`,
          `${s.mean.toFixed(1)} ± ${s.sd === null ? '–' : s.sd.toFixed(1)}`,
        ]
      : [label, 0, '–', '–', '–'];
  table(
    ['Measure', 'n', 'Median', 'IQR (Q1–Q3)', 'Mean ± SD'],
    [
      line('Set-up time', metrics.setupMinutes, 'min'),
      line('Operative time', metrics.operativeMinutes, 'min'),
      line('Target volume', metrics.volumes, 'mm³'),
      line('Ablation rate', metrics.ablationRates, 'mm³/min'),
    ],
  );
  doc.fillColor(muted).fontSize(8.5).text(`Quartiles: ${metrics.quantileMethod}.`, left);
  doc.fillColor(ink).fontSize(10).moveDown(0.4);
  table(
    ['Complication grade (Clavien–Dindo)', 'Cases'],
    metrics.complications.map((c) => [complicationGradeLabels[c.grade] ?? c.grade, c.count]),
  );
  doc.moveDown(0.4);
  table(
    ['Clinician', 'Cases', 'Proctored', 'Plateau by case'],
    metrics.perClinician.map((p) => [
      p.clinicianName,
      p.n,
      `${p.proctored.proctoredCases} of ${p.proctored.threshold}`,
      p.curve ? p.curve.plateauCase : '–',
    ]),
  );

  heading('Costs seen in Evalon');
  const money = (amount: number, currency: string) => formatMoney(amount, currency, 'en-US');
  const cur = costs.deposit.currency;
  fact(
    'Deposit',
    `${money(costs.deposit.amount, cur)}${costs.securedAs ? ` (secured as ${costs.securedAs})` : ' (not secured)'}`,
  );
  if (costs.settled) {
    fact('Kept for charges', money(costs.kept, cur));
    fact('Returned', money(costs.returned, cur));
    if (costs.uncovered > 0) fact('Invoiced beyond the deposit', money(costs.uncovered, cur));
  } else {
    fact('Settlement', 'not settled yet');
  }
  if (costs.charges.length > 0) {
    doc.moveDown(0.3);
    table(
      ['Charge', 'Amount'],
      costs.charges.map((c) => [c.reason, money(c.amount, cur)]),
    );
  }
  doc.moveDown(0.3);
  table(
    ['Proctoring visit', 'State', 'Fee'],
    costs.proctorFees.length === 0
      ? [['none', '', '']]
      : costs.proctorFees.map((f) => [
          f.reference,
          f.state,
          f.fee ? money(f.fee.amount, f.fee.currency) : 'no fee set',
        ]),
  );
  doc.end();
  return done;
}
