import { fitLearningCurve, type LearningCurve } from './learning-curve';
import {
  countComplications,
  defaultSignOffThreshold,
  proctoredProgress,
  type ComplicationGrade,
  type ProctoredProgress,
} from './outcomes';
import { summarise, type NumericSummary } from './summary';
import { ablationRateMm3PerMin, ellipsoidVolumeMm3, type TargetSize } from './volume';

/** What the metrics need of one case record. */
export interface MetricsCase {
  /** Case number within the loan's evaluation (1, 2, …). */
  caseNumber: number;
  /** The clinician who performed the case. */
  clinicianId: number;
  setupMinutes: number;
  operativeMinutes: number;
  energyMinutes?: number | null;
  target?: TargetSize | null;
  complicationGrade?: ComplicationGrade | null;
  /** Whether a proctor supervised the case (linked to a visit). */
  proctored: boolean;
}

/** Derived values shown beside each case. */
export interface CaseDerived {
  targetVolumeMm3: number | null;
  ablationRateMm3PerMin: number | null;
}

/** Volume and ablation rate of one case; `null` where the inputs are missing. */
export function deriveCase(c: Pick<MetricsCase, 'target' | 'energyMinutes'>): CaseDerived {
  const targetVolumeMm3 = c.target ? ellipsoidVolumeMm3(c.target) : null;
  return {
    targetVolumeMm3,
    ablationRateMm3PerMin: ablationRateMm3PerMin(targetVolumeMm3, c.energyMinutes),
  };
}

/** One clinician's figures. */
export interface ClinicianMetrics {
  clinicianId: number;
  n: number;
  setupMinutes: NumericSummary;
  operativeMinutes: NumericSummary;
  /**
   * Learning curve over the clinician's own cases in order (their 1st, 2nd, … case on this
   * loan, by case number), `null` below three cases.
   */
  curve: LearningCurve | null;
  proctored: ProctoredProgress;
}

/** The figures of one loan's evaluation. */
export interface LoanMetrics {
  cases: number;
  setupMinutes: NumericSummary | null;
  operativeMinutes: NumericSummary | null;
  perClinician: ClinicianMetrics[];
  volumes: NumericSummary | null;
  ablationRates: NumericSummary | null;
  complications: { grade: ComplicationGrade; count: number }[];
}

/** Computes the loan's metrics; clinicians in ascending id order. */
export function loanMetrics(
  cases: readonly MetricsCase[],
  signOffThreshold = defaultSignOffThreshold,
): LoanMetrics {
  const derived = cases.map((c) => deriveCase(c));
  const byClinician = new Map<number, MetricsCase[]>();
  for (const c of cases) {
    const list = byClinician.get(c.clinicianId);
    if (list) list.push(c);
    else byClinician.set(c.clinicianId, [c]);
  }
  const perClinician = [...byClinician.entries()]
    .sort(([a], [b]) => a - b)
    .map(([clinicianId, own]): ClinicianMetrics => {
      const ordered = [...own].sort((a, b) => a.caseNumber - b.caseNumber);
      return {
        clinicianId,
        n: own.length,
        setupMinutes: summarise(own.map((c) => c.setupMinutes))!,
        operativeMinutes: summarise(own.map((c) => c.operativeMinutes))!,
        curve: fitLearningCurve(
          ordered.map((c, i) => ({ caseNumber: i + 1, operativeMinutes: c.operativeMinutes })),
        ),
        proctored: proctoredProgress(own.filter((c) => c.proctored).length, signOffThreshold),
      };
    });
  return {
    cases: cases.length,
    setupMinutes: summarise(cases.map((c) => c.setupMinutes)),
    operativeMinutes: summarise(cases.map((c) => c.operativeMinutes)),
    perClinician,
    volumes: summarise(derived.map((d) => d.targetVolumeMm3)),
    ablationRates: summarise(derived.map((d) => d.ablationRateMm3PerMin)),
    complications: countComplications(cases.map((c) => c.complicationGrade)),
  };
}
