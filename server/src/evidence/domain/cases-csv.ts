import type { EvaluationCase, EvaluationReport } from '@evalon/contracts';
import { caseOutcomeLabels, csvSafeCell, procedureLabels } from '@evalon/evidence';
import { stringify } from 'csv-stringify/sync';

/** Columns of the cases CSV: de-identified fields only (no note free text beyond the guard). */
const columns = [
  'case_number',
  'evaluation_day',
  'procedure',
  'clinician',
  'units_used',
  'setup_minutes',
  'operative_minutes',
  'energy_minutes',
  'target_length_mm',
  'target_width_mm',
  'target_height_mm',
  'target_volume_mm3',
  'ablation_rate_mm3_per_min',
  'outcome',
  'clavien_dindo_grade',
  'proctored',
  'device_issues',
  'note',
];

const round = (x: number | null, digits: number) =>
  x === null ? null : Math.round(x * 10 ** digits) / 10 ** digits;

/**
 * The loan's de-identified cases as CSV (RFC 4180 quoting by csv-stringify), one row per case in
 * case-number order. Text cells pass the formula-injection guard; the clinician's name is the
 * report's (a pseudonym when the lender reads by consent).
 */
export function casesCsv(report: EvaluationReport, cases: EvaluationCase[]): string {
  const names = new Map(report.metrics.perClinician.map((p) => [p.clinicianId, p.clinicianName]));
  const rows = [...cases]
    .sort((x, y) => x.caseNumber - y.caseNumber)
    .map((c) =>
      [
        c.caseNumber,
        c.evaluationDay,
        procedureLabels[c.procedure] ?? c.procedure,
        names.get(c.clinicianId) ?? c.clinicianName,
        c.unitIds.length,
        c.setupMinutes,
        c.operativeMinutes,
        c.energyMinutes,
        c.target?.lengthMm ?? null,
        c.target?.widthMm ?? null,
        c.target?.heightMm ?? null,
        round(c.targetVolumeMm3, 1),
        round(c.ablationRateMm3PerMin, 2),
        c.outcome ? caseOutcomeLabels[c.outcome] : null,
        c.complicationGrade,
        c.proctored,
        c.deviceIssues,
        c.note,
      ].map(csvSafeCell),
    );
  return stringify(rows, { header: true, columns, bom: true });
}
