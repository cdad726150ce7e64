import { ChangeDetectionStrategy, Component, inject, input, output, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import {
  decisionInput,
  decisionLabels,
  decisionReasonLabels,
  decisionReasons,
  decisions,
  type Decision,
  type DecisionReason,
  type EvaluationDecision,
} from '@evalon/contracts';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { EvidenceApi } from './evidence-api';

/** The buyer records the hospital's decision after the evaluation: buy, not now or no. */
@Component({
  selector: 'ev-evaluation-decision',
  imports: [
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatInputModule,
    MatRadioModule,
    ReactiveFormsModule,
  ],
  template: `
    @if (current(); as d) {
      <p class="current">
        Recorded: <strong>{{ decisionLabels[d.decision] }}</strong> by {{ d.decidedByName }} ({{
          reasonText(d)
        }}). Sending again replaces it; the audit trail keeps each version.
      </p>
    }
    <form [formGroup]="form" (ngSubmit)="send()" novalidate>
      <mat-radio-group formControlName="decision" aria-label="Decision" class="choices">
        @for (d of decisions; track d) {
          <mat-radio-button [value]="d">{{ decisionLabels[d] }}</mat-radio-button>
        }
      </mat-radio-group>
      <fieldset>
        <legend>Reasons</legend>
        <div class="reasons">
          @for (r of reasons; track r) {
            <mat-checkbox [checked]="chosen().includes(r)" (change)="toggle(r, $event.checked)">{{
              reasonLabels[r]
            }}</mat-checkbox>
          }
        </div>
      </fieldset>
      <mat-form-field class="full" subscriptSizing="dynamic">
        <mat-label>Note for the committee</mat-label>
        <textarea matInput formControlName="note" rows="2"></textarea>
        @if (noteError(); as message) {
          <mat-error>{{ message }}</mat-error>
        }
      </mat-form-field>
      @if (problem(); as message) {
        <p class="problem" role="alert">{{ message }}</p>
      }
      <button mat-flat-button type="submit" [disabled]="saving()">Record the decision</button>
    </form>
  `,
  styles: `
    .choices {
      display: flex;
      gap: 16px;
      margin-bottom: 8px;
    }
    fieldset {
      border: 0;
      padding: 0;
      margin: 0;
    }
    legend {
      font: var(--mat-sys-title-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .reasons {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(240px, 1fr));
    }
    .full {
      width: 100%;
      margin-top: 8px;
    }
    .problem {
      color: var(--mat-sys-error);
    }
    .current {
      font: var(--mat-sys-body-medium);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EvaluationDecisionForm {
  private readonly api = inject(EvidenceApi);
  private readonly notifier = inject(Notifier);

  /** The loan decided on. */
  readonly loanId = input.required<number>();
  /** The decision recorded so far, if any. */
  readonly current = input<EvaluationDecision | null>(null);
  /** Emitted after the decision was saved. */
  readonly saved = output<void>();

  protected readonly decisions = decisions;
  protected readonly decisionLabels = decisionLabels;
  protected readonly reasons = decisionReasons;
  protected readonly reasonLabels = decisionReasonLabels;
  protected readonly chosen = signal<DecisionReason[]>([]);
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly noteError = signal<string | null>(null);

  readonly form = new FormGroup({
    decision: new FormControl<Decision | null>(null),
    note: new FormControl<string | null>(null),
  });

  protected reasonText(d: EvaluationDecision): string {
    return d.reasons.map((r) => decisionReasonLabels[r].toLowerCase()).join(', ');
  }

  protected toggle(reason: DecisionReason, on: boolean): void {
    this.chosen.update((list) =>
      on ? [...list.filter((r) => r !== reason), reason] : list.filter((r) => r !== reason),
    );
  }

  protected send(): void {
    this.problem.set(null);
    this.noteError.set(null);
    const v = this.form.getRawValue();
    const parsed = decisionInput.safeParse({
      decision: v.decision ?? undefined,
      reasons: this.chosen(),
      note: v.note?.trim() || null,
    });
    if (!parsed.success) {
      const byField = (f: string) =>
        parsed.error.issues.filter((i) => i.path[0] === f).map((i) => i.message);
      const note = byField('note');
      if (note.length) {
        this.noteError.set(note.join(' '));
        this.form.controls.note.setErrors({ contract: true });
        this.form.controls.note.markAsTouched();
      }
      const other = [...byField('decision'), ...byField('reasons')];
      if (other.length) this.problem.set(other.join(' '));
      return;
    }
    this.saving.set(true);
    this.api.decide(this.loanId(), parsed.data).subscribe({
      next: (d) => {
        this.saving.set(false);
        this.notifier.success(`Decision recorded: ${decisionLabels[d.decision]}.`);
        this.saved.emit();
      },
      error: (error: unknown) => {
        this.saving.set(false);
        this.problem.set(messageOf(error));
      },
    });
  }
}
