import { ChangeDetectionStrategy, Component, inject, input, output, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import {
  feedbackInput,
  feedbackItemLabels,
  feedbackItems,
  likertLabels,
  type FeedbackItem,
} from '@evalon/contracts';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { EvidenceApi } from './evidence-api';

/**
 * The clinician's short survey on the platform: six statements rated 1 (strongly disagree) to
 * 5 (strongly agree) and a comment. Sending it again revises the answers.
 */
@Component({
  selector: 'ev-evaluation-survey',
  imports: [
    MatButtonModule,
    MatFormFieldModule,
    MatInputModule,
    MatRadioModule,
    ReactiveFormsModule,
  ],
  template: `
    <form [formGroup]="form" (ngSubmit)="send()" novalidate>
      <p class="scale" id="likert-scale">1 = {{ likert[0] }} · 5 = {{ likert[4] }}</p>
      @for (item of items; track item) {
        <div class="item" role="group" [attr.aria-labelledby]="'survey-' + item">
          <span class="statement" [id]="'survey-' + item">{{ labels[item] }}</span>
          <mat-radio-group [formControlName]="item" [attr.aria-describedby]="'likert-scale'">
            @for (v of values; track v) {
              <mat-radio-button [value]="v" [aria-label]="v + ': ' + likert[v - 1]">{{
                v
              }}</mat-radio-button>
            }
          </mat-radio-group>
        </div>
      }
      <mat-form-field class="full" subscriptSizing="dynamic">
        <mat-label>Comment</mat-label>
        <textarea matInput formControlName="comment" rows="2"></textarea>
        <mat-hint>No names, record numbers, dates, phone numbers or e-mail addresses</mat-hint>
        @if (commentError(); as message) {
          <mat-error>{{ message }}</mat-error>
        }
      </mat-form-field>
      @if (problem(); as message) {
        <p class="problem" role="alert">{{ message }}</p>
      }
      <button mat-flat-button type="submit" [disabled]="saving()">Send my answers</button>
    </form>
  `,
  styles: `
    .scale {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-small);
      margin: 0 0 8px;
    }
    .item {
      display: flex;
      flex-wrap: wrap;
      justify-content: space-between;
      align-items: center;
      gap: 4px 16px;
      padding: 4px 0;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    .statement {
      font: var(--mat-sys-body-medium);
    }
    .full {
      width: 100%;
      margin-top: 12px;
    }
    .problem {
      color: var(--mat-sys-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EvaluationSurvey {
  private readonly api = inject(EvidenceApi);
  private readonly notifier = inject(Notifier);

  /** The loan the survey is about. */
  readonly loanId = input.required<number>();
  /** Emitted after the answers were saved. */
  readonly saved = output<void>();

  protected readonly items = feedbackItems;
  protected readonly labels = feedbackItemLabels;
  protected readonly likert = likertLabels;
  protected readonly values = [1, 2, 3, 4, 5];
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly commentError = signal<string | null>(null);

  readonly form = new FormGroup({
    ...(Object.fromEntries(
      feedbackItems.map((i) => [i, new FormControl<number | null>(null, Validators.required)]),
    ) as Record<FeedbackItem, FormControl<number | null>>),
    comment: new FormControl<string | null>(null),
  });

  protected send(): void {
    this.problem.set(null);
    this.commentError.set(null);
    const v = this.form.getRawValue();
    const parsed = feedbackInput.safeParse({
      ratings: Object.fromEntries(feedbackItems.map((i) => [i, v[i] ?? undefined])),
      comment: v.comment?.trim() || null,
    });
    if (!parsed.success) {
      const comment = parsed.error.issues.filter((i) => i.path[0] === 'comment');
      if (comment.length) {
        this.commentError.set(comment.map((i) => i.message).join(' '));
        this.form.controls.comment.setErrors({ contract: true });
        this.form.controls.comment.markAsTouched();
      }
      if (parsed.error.issues.some((i) => i.path[0] === 'ratings')) {
        this.problem.set('Rate every statement from 1 to 5.');
      }
      return;
    }
    this.saving.set(true);
    this.api.feedback(this.loanId(), parsed.data).subscribe({
      next: () => {
        this.saving.set(false);
        this.notifier.success(
          'Your answers are saved. You can change them until the loan is back.',
        );
        this.saved.emit();
      },
      error: (error: unknown) => {
        this.saving.set(false);
        this.problem.set(messageOf(error));
      },
    });
  }
}
