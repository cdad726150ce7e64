import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  signal,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatSlideToggle, MatSlideToggleChange } from '@angular/material/slide-toggle';
import { MatTableModule } from '@angular/material/table';
import type { CreditAgreement } from '@evalon/contracts';
import { filter, forkJoin, switchMap, tap } from 'rxjs';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { formatInstant } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { StatusPill } from '../../shared/status-pill/status-pill';
import { CreditAgreementsApi, KnownHospital } from './credit-agreements-api';
import { LoadError, LoadingBar, loadOnChange } from '../../shared/list-page';
import { activeLender } from '../../shared/active-lender';

/** One hospital in the table: its agreement (if one was ever recorded) and its loans with us. */
export interface AgreementRow {
  readonly hospitalId: number;
  readonly hospitalName: string;
  readonly agreement: CreditAgreement | null;
  readonly loanCount: number;
}

/**
 * Hospitals with an agreement on record first (by name), then the others that asked for loans,
 * each once.
 */
export function agreementRows(
  agreements: readonly CreditAgreement[],
  hospitals: readonly KnownHospital[],
): AgreementRow[] {
  const rows = new Map<number, AgreementRow>();
  for (const a of agreements) {
    rows.set(a.hospitalId, {
      hospitalId: a.hospitalId,
      hospitalName: a.hospitalName,
      agreement: a,
      loanCount: 0,
    });
  }
  for (const h of hospitals) {
    const row = rows.get(h.hospitalId);
    rows.set(h.hospitalId, {
      hospitalId: h.hospitalId,
      hospitalName: row?.hospitalName ?? h.hospitalName,
      agreement: row?.agreement ?? null,
      loanCount: h.loanCount,
    });
  }
  return [...rows.values()].sort((a, b) => a.hospitalName.localeCompare(b.hospitalName));
}

/**
 * The lender's credit agreements: for each hospital, whether its buyers may confirm loans with a
 * purchase order number instead of a card deposit. Each switch asks for confirmation first.
 */
@Component({
  selector: 'ev-credit-agreements',
  imports: [
    LoadError,
    LoadingBar,
    Cautions,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatSlideToggle,
    MatTableModule,
    PageHeader,
    StatusPill,
  ],
  templateUrl: './credit-agreements.html',
  styleUrl: './credit-agreements.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CreditAgreements {
  private readonly api = inject(CreditAgreementsApi);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);
  private readonly locale = inject(LOCALE_ID);

  protected readonly columns = ['hospital', 'status', 'record', 'switch'];
  protected readonly lender = activeLender();
  protected readonly rows = signal<AgreementRow[]>([]);
  protected readonly loading = signal(true);
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);
  /** The hospital whose switch is being saved. */
  protected readonly saving = signal<number | null>(null);
  private readonly attempt = signal(0);

  protected readonly activeCount = computed(
    () => this.rows().filter((r) => r.agreement?.active).length,
  );

  constructor() {
    loadOnChange({
      params: computed(() => {
        const lender = this.lender();
        return lender ? { lenderId: lender.id, attempt: this.attempt() } : null;
      }),
      load: ({ lenderId }) =>
        forkJoin([this.api.list(lenderId), this.api.knownHospitals(lenderId)]),
      loading: this.loading,
      error: this.loadError,
      done: ([agreements, hospitals]) => {
        this.rows.set(agreementRows(agreements, hospitals));
        this.loaded.set(true);
      },
    });
  }

  /** Rows keep their element when an agreement changes, so focus stays on the switch. */
  protected readonly trackRow = (_: number, row: AgreementRow) => row.hospitalId;

  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  protected record(row: AgreementRow): string {
    const a = row.agreement;
    if (!a) return 'Never set up';
    const zone = this.session.timeZone();
    if (a.active && a.approvedAt) {
      return `On since ${formatInstant(a.approvedAt, zone, this.locale)}${a.approvedBy ? ` · ${a.approvedBy}` : ''}`;
    }
    return `Off since ${formatInstant(a.updatedAt, zone, this.locale)}`;
  }

  protected loansText(row: AgreementRow): string {
    if (row.loanCount === 0) return 'No loans with you yet';
    return row.loanCount === 1 ? '1 loan with you' : `${row.loanCount} loans with you`;
  }

  /**
   * The switch was flipped: put it back until the person confirms (the table shows what the
   * server holds, never a wish), then save.
   */
  protected toggle(row: AgreementRow, change: MatSlideToggleChange): void {
    const wanted = change.checked;
    change.source.checked = !wanted;
    const lender = this.lender();
    if (!lender) return;
    const data = wanted
      ? {
          title: `Turn on the credit agreement with ${row.hospitalName}?`,
          message: `Their buyers can then confirm ${lender.name} loans with a purchase order number instead of a card deposit. Nothing is held or charged for those loans.`,
          confirmLabel: 'Turn on',
        }
      : {
          title: `Turn off the credit agreement with ${row.hospitalName}?`,
          message:
            'From now on their buyers secure deposits by card. Loans already confirmed with a purchase order keep their terms.',
          confirmLabel: 'Turn off',
          destructive: true,
        };
    confirmAction(this.dialog, data)
      .pipe(
        filter(Boolean),
        tap(() => this.saving.set(row.hospitalId)),
        switchMap(() => this.api.set(lender.id, row.hospitalId, wanted)),
      )
      .subscribe({
        next: (agreement) => {
          this.saving.set(null);
          this.rows.update((rows) =>
            rows.map((r) => (r.hospitalId === row.hospitalId ? { ...r, agreement } : r)),
          );
          this.notifier.success(
            agreement.active
              ? `${row.hospitalName} may now confirm loans with a purchase order.`
              : `${row.hospitalName} now secures deposits by card.`,
          );
        },
        error: (error: unknown) => {
          this.saving.set(null);
          this.notifier.error(error);
        },
      });
  }
}
