import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  LOCALE_ID,
  computed,
  effect,
  inject,
  signal,
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatChipListboxChange, MatChipsModule } from '@angular/material/chips';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { Loan, LoanState } from '@evalon/contracts';
import { DateTime } from 'luxon';
import { messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { moneyText } from '../../shared/formats';
import { formatInstant, formatWindowCompact } from '../../shared/iso-date';
import { LoanDraft } from '../../shared/loan-draft';
import { loanStateLabels, loanStates } from '../../shared/loan-rules';
import { LoanStateChip } from '../../shared/loan-state-chip';
import { PageHeader } from '../../shared/page-header/page-header';
import { LoanApi } from './loan-api';

/** A loan with what the table shows already worked out. */
export interface LoanRow {
  readonly loan: Loan;
  /** "Quorvel R2 robotic platform + 1 more". */
  readonly equipment: string;
  /** The first unit's model. */
  readonly firstModel: string;
  /** How many more units the loan holds. */
  readonly moreUnits: number;
  /** Every unit, for the tooltip and the filter. */
  readonly equipmentFull: string;
  readonly windowText: string;
  readonly stateLabel: string;
  readonly depositText: string;
  /** The day of the request in the viewer's zone, e.g. "Dec 1, 2026". */
  readonly requestedDay: string;
  /** The exact time of the request in the viewer's zone. */
  readonly requestedText: string;
}

/** Words for the units of a loan: the first model, and how many more units. */
export function equipmentSummary(loan: Loan): string {
  const [first, ...rest] = loan.units;
  if (!first) return '—';
  return rest.length ? `${first.modelName} + ${rest.length} more` : first.modelName;
}

/** The hospital's loans: find one by state or words, sort, page, open. */
@Component({
  selector: 'ev-loan-list',
  imports: [
    EmptyState,
    LoanStateChip,
    MatButtonModule,
    MatCardModule,
    MatChipsModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSortModule,
    MatTableModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './loan-list.html',
  styleUrl: './loan-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanList {
  private readonly api = inject(LoanApi);
  private readonly session = inject(SessionStore);
  private readonly locale = inject(LOCALE_ID);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly draft = inject(LoanDraft);

  protected readonly columns = [
    'reference',
    'equipment',
    'campus',
    'window',
    'state',
    'deposit',
    'requested',
  ];

  /** Whether the person may ask for loans (clinicians only read). */
  protected readonly canRequest = computed(() => this.session.hasAnyRole(['buyer']));

  private readonly loans = signal<Loan[]>([]);
  protected readonly loading = signal(false);
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);
  protected readonly filterText = signal('');
  protected readonly chosenStates = signal<readonly LoanState[]>([]);

  protected readonly rows = computed<LoanRow[]>(() => {
    const zone = this.session.timeZone();
    return this.loans().map((loan) => ({
      loan,
      equipment: equipmentSummary(loan),
      firstModel: loan.units[0]?.modelName ?? '—',
      moreUnits: Math.max(0, loan.units.length - 1),
      equipmentFull: loan.units.map((u) => `${u.modelName} ${u.serialNumber}`).join(', '),
      windowText: formatWindowCompact(loan.useFrom, loan.useTo, this.locale),
      stateLabel: loanStateLabels[loan.state],
      depositText: moneyText(loan.deposit, this.locale),
      requestedDay: DateTime.fromISO(loan.createdAt, { zone, locale: this.locale }).toLocaleString(
        DateTime.DATE_MED,
      ),
      requestedText: formatInstant(loan.createdAt, zone, this.locale),
    }));
  });

  /** States present in the list, with how many loans are in each, in lifecycle order. */
  protected readonly stateOptions = computed(() => {
    const counts = new Map<LoanState, number>();
    for (const loan of this.loans()) counts.set(loan.state, (counts.get(loan.state) ?? 0) + 1);
    return loanStates
      .filter((s) => counts.has(s))
      .map((state) => ({ state, label: loanStateLabels[state], count: counts.get(state)! }));
  });

  protected readonly visibleRows = computed(() => {
    const text = this.filterText().trim().toLowerCase();
    const states = this.chosenStates();
    return this.rows().filter((row) => {
      if (states.length && !states.includes(row.loan.state)) return false;
      if (!text) return true;
      const haystack = [
        row.loan.reference,
        row.equipmentFull,
        row.loan.siteName,
        row.stateLabel,
        row.loan.lenderName,
        row.windowText,
      ]
        .join(' ')
        .toLowerCase();
      return haystack.includes(text);
    });
  });

  protected readonly summary = computed(() => {
    const shown = this.visibleRows().length;
    const total = this.rows().length;
    const noun = total === 1 ? 'loan' : 'loans';
    return shown === total ? `${total} ${noun}` : `${shown} of ${total} ${noun}`;
  });

  protected readonly dataSource = new MatTableDataSource<LoanRow>([]);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    this.dataSource.sortingDataAccessor = (row, column) => {
      switch (column) {
        case 'reference':
          return row.loan.reference;
        case 'equipment':
          return row.equipment.toLowerCase();
        case 'campus':
          return row.loan.siteName.toLowerCase();
        case 'window':
          return row.loan.useFrom;
        case 'state':
          return loanStates.indexOf(row.loan.state);
        case 'deposit':
          return row.loan.deposit.amount;
        case 'requested':
          return row.loan.createdAt;
        default:
          return '';
      }
    };
    effect(() => {
      this.dataSource.data = this.visibleRows();
    });
    effect(() => {
      const sort = this.sort();
      const paginator = this.paginator();
      if (sort) this.dataSource.sort = sort;
      if (paginator) this.dataSource.paginator = paginator;
    });
    this.load();
  }

  protected load(): void {
    this.loading.set(true);
    this.loadError.set(null);
    this.api
      .list()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (loans) => {
          this.loans.set(loans);
          this.loading.set(false);
          this.loaded.set(true);
        },
        error: (error: unknown) => {
          this.loadError.set(messageOf(error));
          this.loading.set(false);
        },
      });
  }

  protected reload(): void {
    this.load();
  }

  protected setFilter(event: Event): void {
    this.filterText.set((event.target as HTMLInputElement).value);
    this.paginator()?.firstPage();
  }

  protected setStates(change: MatChipListboxChange): void {
    this.chosenStates.set((change.value as LoanState[] | null) ?? []);
    this.paginator()?.firstPage();
  }

  protected clearFilters(): void {
    this.filterText.set('');
    this.chosenStates.set([]);
  }
}
