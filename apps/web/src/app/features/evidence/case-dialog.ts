import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import {
  caseInput,
  type CaseFormOptions,
  type CaseInput,
  type EvaluationCase,
} from '@evalon/contracts';
import {
  caseOutcomeLabels,
  caseOutcomes,
  complicationGradeLabels,
  complicationGrades,
  procedureLabels,
} from '@evalon/evidence';
import { ApiError } from '../../core/api-error';
import { Cautions } from '../../shared/cautions/cautions';
import { EvidenceApi } from './evidence-api';

/** What the case form needs. */
export interface CaseDialogData {
  readonly loanId: number;
  readonly options: CaseFormOptions;
  readonly caution: string;
  /** The case to change, or null for a new one. */
  readonly existing: EvaluationCase | null;
  /** Case number a new case starts with (the next free one). */
  readonly nextCaseNumber: number;
  /** Whether the person is a clinician (who may leave "performed by" as themselves). */
  readonly isClinician: boolean;
}

const numberControl = (value: number | null | undefined) =>
  new FormControl<number | null>(value ?? null);
const textControl = (value: string | null | undefined) =>
  new FormControl<string | null>(value ?? null);

/** Control names of the form, where a contract path points to one. */
const controlOf: Record<string, string> = {
  'target.lengthMm': 'lengthMm',
  'target.widthMm': 'widthMm',
  'target.heightMm': 'heightMm',
  target: 'lengthMm',
};

/** Builds the request body from the form's values (blank optional fields left out). */
export function caseBodyFrom(v: CaseDialog['form']['value'], isClinician: boolean): unknown {
  const dims = [v.lengthMm, v.widthMm, v.heightMm];
  const anyDim = dims.some((d) => d !== null && d !== undefined);
  const optionalText = (s: string | null | undefined) => (s?.trim() ? s.trim() : null);
  return {
    caseNumber: v.caseNumber,
    evaluationDay: v.evaluationDay,
    procedure: v.procedure,
    unitIds: v.unitIds ?? [],
    ...(v.clinicianId != null || !isClinician ? { clinicianId: v.clinicianId ?? undefined } : {}),
    setupMinutes: v.setupMinutes,
    operativeMinutes: v.operativeMinutes,
    energyMinutes: v.energyMinutes ?? null,
    target: anyDim ? { lengthMm: v.lengthMm, widthMm: v.widthMm, heightMm: v.heightMm } : null,
    outcome: v.outcome ?? null,
    complicationGrade: v.complicationGrade ?? null,
    visitId: v.visitId ?? null,
    deviceIssues: optionalText(v.deviceIssues),
    note: optionalText(v.note),
  };
}

/**
 * The case form: one de-identified case. Checked with the same contract the server uses before
 * it is sent, so every identifier found in the note is named at once; the server's field
 * messages (units, clinician, case number) land on their fields too.
 */
@Component({
  selector: 'ev-case-dialog',
  imports: [
    Cautions,
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    ReactiveFormsModule,
  ],
  templateUrl: './case-dialog.html',
  styleUrl: './case-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CaseDialog {
  protected readonly data = inject<CaseDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<CaseDialog, EvaluationCase>);
  private readonly api = inject(EvidenceApi);

  protected readonly procedureLabels: Partial<Record<string, string>> = procedureLabels;
  protected readonly outcomes = caseOutcomes;
  protected readonly outcomeLabels = caseOutcomeLabels;
  protected readonly grades = complicationGrades;
  protected readonly gradeLabels = complicationGradeLabels;
  protected readonly saving = signal(false);
  protected readonly formError = signal<string | null>(null);

  readonly form = (() => {
    const c = this.data.existing;
    return new FormGroup({
      caseNumber: numberControl(c?.caseNumber ?? this.data.nextCaseNumber),
      evaluationDay: numberControl(c?.evaluationDay ?? 1),
      procedure: textControl(c?.procedure ?? this.data.options.procedures[0] ?? null),
      unitIds: new FormControl<number[]>(
        c?.unitIds ?? this.data.options.units.slice(0, 1).map((u) => u.unitId),
        { nonNullable: true },
      ),
      clinicianId: numberControl(c?.clinicianId),
      setupMinutes: numberControl(c?.setupMinutes),
      operativeMinutes: numberControl(c?.operativeMinutes),
      energyMinutes: numberControl(c?.energyMinutes),
      lengthMm: numberControl(c?.target?.lengthMm),
      widthMm: numberControl(c?.target?.widthMm),
      heightMm: numberControl(c?.target?.heightMm),
      outcome: textControl(c?.outcome),
      complicationGrade: textControl(c?.complicationGrade ?? '0'),
      visitId: numberControl(c?.visitId),
      deviceIssues: textControl(c?.deviceIssues),
      note: textControl(c?.note),
    });
  })();

  /** The message of a field: the contract's or the server's. */
  protected errorOf(name: string): string | null {
    const errors = this.form.get(name)?.errors;
    return (
      (errors?.['contract'] as string | undefined) ??
      (errors?.['server'] as string | undefined) ??
      null
    );
  }

  private showMessages(messages: Record<string, string[]>): boolean {
    let placed = false;
    for (const [path, list] of Object.entries(messages)) {
      const control = this.form.get(controlOf[path] ?? path);
      if (!control) continue;
      control.setErrors({ contract: list.join(' ') });
      control.markAsTouched();
      placed = true;
    }
    return placed;
  }

  protected save(): void {
    this.formError.set(null);
    const body = caseBodyFrom(this.form.value, this.data.isClinician);
    const parsed = caseInput.safeParse(body);
    if (!parsed.success) {
      const messages: Record<string, string[]> = {};
      for (const issue of parsed.error.issues) {
        (messages[issue.path.map(String).join('.')] ??= []).push(issue.message);
      }
      if (!this.showMessages(messages)) this.formError.set('Some fields need attention.');
      return;
    }
    this.saving.set(true);
    const existing = this.data.existing;
    const request = existing
      ? this.api.change(this.data.loanId, existing.id, parsed.data)
      : this.api.record(this.data.loanId, parsed.data as CaseInput);
    request.subscribe({
      next: (saved) => this.ref.close(saved),
      error: (error: unknown) => {
        this.saving.set(false);
        if (error instanceof ApiError) {
          const fields = Object.fromEntries(
            Object.entries(error.fieldErrors).map(([k, v]) => [k, [v]]),
          );
          const placed = this.showMessages(fields);
          this.formError.set(placed ? null : error.message);
        } else {
          this.formError.set('The case could not be saved. Try again.');
        }
      },
    });
  }
}
