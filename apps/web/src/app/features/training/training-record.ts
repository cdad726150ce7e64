import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  LOCALE_ID,
  computed,
  inject,
  signal,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { competencies, competencyLabels, type TrainingRecord } from '@evalon/contracts';
import { messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { formatInstant, formatWindow } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { traineeRoleLabels, visitStateLabels } from '../../shared/visit-rules';
import { TrainingApi } from './training-api';

/**
 * "My training": the clinician's visits as a trainee with their own cases (role, ratings), per
 * hospital and platform the cases performed under supervision against the hospital's sign-off
 * threshold, and the sign-offs with their one-page record.
 */
@Component({
  selector: 'ev-training-record',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './training-record.html',
  styleUrl: './training-record.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TrainingRecordPage {
  private readonly api = inject(TrainingApi);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly record = signal<TrainingRecord | null>(null);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  protected readonly competencies = competencies;
  protected readonly competencyLabels = competencyLabels;
  protected readonly roleLabels = traineeRoleLabels;

  /** Progress rows with the words and the bar's share. */
  protected readonly progress = computed(() =>
    (this.record()?.progress ?? []).map((p) => ({
      ...p,
      percent: Math.min(100, Math.round((p.supervisedCases / Math.max(p.threshold, 1)) * 100)),
      words: p.signedOff
        ? `Signed off · ${p.supervisedCases} cases performed under supervision`
        : p.supervisedCases >= p.threshold
          ? `${p.supervisedCases} of ${p.threshold}: the proctor can sign you off`
          : `${p.supervisedCases} of ${p.threshold} cases performed under supervision`,
    })),
  );
  protected readonly visits = computed(() =>
    (this.record()?.visits ?? []).map((v) => ({
      ...v,
      days: formatWindow(v.from, v.to, this.locale),
      stateLabel: visitStateLabels[v.state],
    })),
  );

  constructor() {
    this.load();
  }

  /** A rating out of 5, or a dash when the competency was not rated. */
  protected rating(ratings: Readonly<Record<string, number | undefined>>, key: string): string {
    return String(ratings[key] ?? '—');
  }

  protected when(at: string): string {
    return formatInstant(at, this.session.timeZone(), this.locale);
  }

  protected load(): void {
    this.loading.set(true);
    this.loadError.set(null);
    this.api
      .record()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (r) => {
          this.record.set(r);
          this.loading.set(false);
        },
        error: (e: unknown) => {
          this.loadError.set(messageOf(e));
          this.loading.set(false);
        },
      });
  }
}
