import { ChangeDetectionStrategy, Component, LOCALE_ID, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatChipListboxChange, MatChipsModule } from '@angular/material/chips';
import { MatIconModule } from '@angular/material/icon';
import { MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { Loan, LoanPage, LoanState } from '@evalon/contracts';
import { loanSortFields } from '@evalon/contracts/values';
import { DateTime } from 'luxon';
import { SessionStore } from '../../core/session-store';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { ListPage, ListPageParts, listQuery, listSource, listWords } from '../../shared/list-page';
import { moneyText } from '../../shared/formats';
import { formatInstant, formatWindowCompact } from '../../shared/iso-date';
import { LoanDraft } from '../../shared/loan-draft';
import { loanStateLabels, loanStates } from '@evalon/contracts/values';
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
    ListPageParts,
    LoanStateChip,
    MatButtonModule,
    MatCardModule,
    MatChipsModule,
    MatIconModule,
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

  /** Page, size, order, search words and chosen states, in the URL. */
  protected readonly query = listQuery({
    sortFields: loanSortFields,
    defaultSort: { field: 'requested', dir: 'desc' },
    filters: ['state'],
  });
  /** States chosen in the chips (none = every state). */
  protected readonly chosenStates = computed(() => {
    const text = this.query.request().filters.state;
    return (text ? text.split(',') : []) as LoanState[];
  });

  /** The page of loans the URL asks for. */
  protected readonly loans = listSource({
    params: () => this.query.request(),
    load: (request) => this.api.page(request),
    rows: (answer: LoanPage) => answer.items.map((loan) => this.toRow(loan)),
    key: (row) => row.loan.id,
  });

  /** The list as its template's parts see it. */
  protected readonly list: ListPage = {
    query: this.query,
    source: this.loans,
    words: listWords('loan', 'loans', {
      noMatch: () => 'No loans match these filters.',
      clear: 'Show all loans',
    }),
  };

  /** States with loans matching the search, with how many, in lifecycle order. */
  protected readonly stateOptions = computed(() => {
    const counts = this.loans.answer()?.stateCounts ?? [];
    return loanStates
      .map((state) => ({ state, count: counts.find((c) => c.state === state)?.count ?? 0 }))
      .filter((option) => option.count > 0)
      .map((option) => ({ ...option, label: loanStateLabels[option.state] }));
  });

  protected readonly summary = computed(() => {
    const answer = this.loans.answer();
    if (!answer) return '';
    const shown = answer.total;
    const total = answer.stateCounts.reduce((sum, c) => sum + c.count, 0);
    const noun = total === 1 ? 'loan' : 'loans';
    return shown === total ? `${total} ${noun}` : `${shown} of ${total} ${noun}`;
  });

  protected setStates(change: MatChipListboxChange): void {
    const states = (change.value as LoanState[] | null) ?? [];
    this.query.setFilter('state', states.join(','));
  }

  private toRow(loan: Loan): LoanRow {
    const zone = this.session.timeZone();
    return {
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
    };
  }
}
