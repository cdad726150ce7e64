/**
 * Outcome vocabulary of a case record: complication grades, stone-free status, and the count of
 * cases performed under a proctor against the hospital's sign-off threshold.
 */

/**
 * Clavien–Dindo classification of surgical complications (Dindo, Demartines, Clavien, Ann Surg
 * 2004; 240:205–213, grades from memory and listed in docs/references.md). "0" is our value
 * for "no complication" so that every case has a grade; the published scale starts at I.
 */
export const complicationGrades = ['0', 'I', 'II', 'IIIa', 'IIIb', 'IVa', 'IVb', 'V'] as const;
/** One of `complicationGrades`. */
export type ComplicationGrade = (typeof complicationGrades)[number];

/** Short wording of each grade for forms and tables (our paraphrase of the published scale). */
export const complicationGradeLabels: Record<ComplicationGrade, string> = {
  '0': '0 — no complication',
  I: 'I — deviation from normal course, no specific treatment',
  II: 'II — needed drug treatment',
  IIIa: 'IIIa — intervention without general anaesthesia',
  IIIb: 'IIIb — intervention under general anaesthesia',
  IVa: 'IVa — single-organ dysfunction (intensive care)',
  IVb: 'IVb — multi-organ dysfunction (intensive care)',
  V: 'V — death',
};

/** Outcome of the case at follow-up. */
export const caseOutcomes = ['complete', 'residual_fragments', 'abandoned', 'converted'] as const;
/** One of `caseOutcomes`. */
export type CaseOutcome = (typeof caseOutcomes)[number];
export const caseOutcomeLabels: Record<CaseOutcome, string> = {
  complete: 'Complete',
  residual_fragments: 'Residual fragments at follow-up',
  abandoned: 'Abandoned',
  converted: 'Converted to another approach',
};

/** Counts of cases by grade, every grade present (0 when none), in scale order. */
export function countComplications(
  grades: readonly (ComplicationGrade | null | undefined)[],
): { grade: ComplicationGrade; count: number }[] {
  const counts = new Map<ComplicationGrade, number>(complicationGrades.map((g) => [g, 0]));
  for (const g of grades) {
    if (g != null && counts.has(g)) counts.set(g, counts.get(g)! + 1);
  }
  return complicationGrades.map((grade) => ({ grade, count: counts.get(grade)! }));
}

/** Whether a grade is a major complication (grade III or higher, the usual cut in reports). */
export function isMajorComplication(grade: ComplicationGrade): boolean {
  return complicationGrades.indexOf(grade) >= complicationGrades.indexOf('IIIa');
}

/**
 * Default number of proctored cases before sign-off: a survey of 42 US hospital policies found a
 * mean of 3.24 ± 1.69 (range 1–10) proctored cases (docs/references.md); the product's policy
 * default is 3 and each hospital sets its own.
 */
export const defaultSignOffThreshold = 3;

/** A clinician's proctored cases against the threshold. */
export interface ProctoredProgress {
  proctoredCases: number;
  threshold: number;
  /** Whether the count reached the threshold (the sign-off itself is the proctor's act). */
  reached: boolean;
  remaining: number;
}

/** Proctored cases (those linked to a visit) against the threshold. */
export function proctoredProgress(
  proctoredCases: number,
  threshold = defaultSignOffThreshold,
): ProctoredProgress {
  if (!Number.isInteger(threshold) || threshold < 1) {
    throw new RangeError(`The sign-off threshold must be a whole number ≥ 1, got ${threshold}.`);
  }
  return {
    proctoredCases,
    threshold,
    reached: proctoredCases >= threshold,
    remaining: Math.max(0, threshold - proctoredCases),
  };
}
