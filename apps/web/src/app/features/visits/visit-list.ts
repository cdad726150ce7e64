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
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { Visit } from '@evalon/contracts';
import { messageOf } from '../../core/api-error';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { moneyText } from '../../shared/formats';
import { formatWindowCompact } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { visitStateLabels } from '../../shared/visit-rules';
import { VisitApi } from './visit-api';

/** The hospital's proctoring visits, newest first, with who holds or accepted each. */
@Component({
  selector: 'ev-visit-list',
  imports: [
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatTableModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './visit-list.html',
  styleUrl: './visit-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VisitList {
  private readonly api = inject(VisitApi);
  private readonly locale = inject(LOCALE_ID);
  private readonly destroyRef = inject(DestroyRef);

  protected readonly columns = ['reference', 'model', 'campus', 'days', 'state', 'proctor', 'fee'];
  private readonly visits = signal<Visit[]>([]);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);

  protected readonly rows = computed(() =>
    this.visits().map((visit) => ({
      visit,
      days: formatWindowCompact(visit.from, visit.to, this.locale),
      state: visitStateLabels[visit.state],
      proctor:
        visit.proctorName ??
        (visit.currentOffer ? `Offered to ${visit.currentOffer.proctorName}` : '—'),
      fee: visit.feeEstimate ? moneyText(visit.feeEstimate, this.locale) : '—',
    })),
  );

  constructor() {
    this.load();
  }

  protected load(): void {
    this.loading.set(true);
    this.loadError.set(null);
    this.api
      .list({ role: 'hospital' })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (visits) => {
          this.visits.set(visits);
          this.loading.set(false);
        },
        error: (error: unknown) => {
          this.loadError.set(messageOf(error));
          this.loading.set(false);
        },
      });
  }
}
