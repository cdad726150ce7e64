import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  input,
  output,
  signal,
} from '@angular/core';
import { DecimalPipe } from '@angular/common';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressSpinnerModule } from '@angular/material/progress-spinner';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import type { AlternativeItem, AvailabilityItem } from '@evalon/contracts';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { CatalogApi } from '../../shared/catalog-api';
import { DayPipe, MoneyPipe, WindowPipe } from '../../shared/formats';
import { IsoDate } from '../../shared/iso-date';
import { LoanDraft, addOutcomeMessage, draftUnitOf } from '../../shared/loan-draft';

/** The campus and case days a search was made for. */
export interface SearchWindow {
  readonly siteId: number;
  readonly useFrom: IsoDate;
  readonly useTo: IsoDate;
}

/** A use window to search again with (from "Earliest" on a unit that does not fit). */
export interface DatesChoice {
  readonly useFrom: IsoDate;
  readonly useTo: IsoDate;
}

/**
 * One unit in the search results: whether it can be at the campus for the case days, when it
 * ships and arrives, how far it travels, its deposit, and "Add to request". A unit that does
 * not fit says why, offers its earliest dates and, on demand, units that could stand in.
 */
@Component({
  selector: 'ev-availability-row',
  imports: [
    DayPipe,
    DecimalPipe,
    MatButtonModule,
    MatIconModule,
    MatProgressSpinnerModule,
    MatTooltipModule,
    MoneyPipe,
    RouterLink,
    WindowPipe,
  ],
  templateUrl: './availability-row.html',
  styleUrl: './availability-row.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    role: 'listitem',
    '[class.feasible]': 'item().feasible',
    '[class.blocked]': '!item().feasible',
    '[attr.data-unit-id]': 'item().unitId',
  },
})
export class AvailabilityRow {
  private readonly api = inject(CatalogApi);
  private readonly draft = inject(LoanDraft);
  private readonly notifier = inject(Notifier);

  /** The unit as the search answered it. */
  readonly item = input.required<AvailabilityItem>();
  /** The search's campus and case days (for the unit link and the alternatives). */
  readonly window = input.required<SearchWindow>();
  /** Where the depot is, e.g. "Edison, US". */
  readonly depotPlace = input<string | null>(null);
  /** The person asked to search again with other dates. */
  readonly useDates = output<DatesChoice>();

  protected readonly chosen = computed(() => this.draft.unitIds().has(this.item().unitId));
  // Merged into the search's own query (see the template), so the unit page's "Back to results"
  // can return to the same category, words and compatibility filter as well as the dates.
  protected readonly unitQuery = computed(() => {
    const w = this.window();
    return { siteId: w.siteId, from: w.useFrom, to: w.useTo };
  });
  /** The earliest window that fits, when the server found one. */
  protected readonly earliest = computed<DatesChoice | null>(() => {
    const item = this.item();
    return item.earliestUseFrom && item.earliestUseTo
      ? { useFrom: item.earliestUseFrom, useTo: item.earliestUseTo }
      : null;
  });

  protected readonly alternatives = signal<AlternativeItem[] | null>(null);
  protected readonly alternativesLoading = signal(false);
  protected readonly alternativesError = signal<string | null>(null);
  /** Whether the stand-ins are shown. */
  protected readonly alternativesOpen = signal(false);
  private static nextId = 0;
  protected readonly panelId = `ev-alternatives-${AvailabilityRow.nextId++}`;

  protected toggle(item: AvailabilityItem = this.item()): void {
    if (this.draft.has(item.unitId)) {
      this.draft.remove(item.unitId);
      return;
    }
    const w = this.window();
    this.draft.setWindow(w.siteId, w.useFrom, w.useTo);
    const outcome = this.draft.add(draftUnitOf(item));
    const problem = addOutcomeMessage(outcome, this.draft.lender()?.name ?? null);
    if (problem) this.notifier.error(problem);
  }

  protected isChosen(unitId: number): boolean {
    return this.draft.unitIds().has(unitId);
  }

  protected toggleAlternatives(): void {
    const open = !this.alternativesOpen();
    this.alternativesOpen.set(open);
    if (open && this.alternatives() === null && !this.alternativesLoading())
      this.loadAlternatives();
  }

  protected loadAlternatives(): void {
    this.alternativesLoading.set(true);
    this.alternativesError.set(null);
    this.api.alternatives(this.item().unitId, this.window()).subscribe({
      next: (items) => {
        this.alternatives.set(items);
        this.alternativesLoading.set(false);
      },
      error: (error: unknown) => {
        this.alternativesError.set(messageOf(error));
        this.alternativesLoading.set(false);
      },
    });
  }
}
