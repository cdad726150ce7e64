import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import type { Hold, Unit } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { CalendarDay, HoldCalendar, monthOf } from '../../shared/hold-calendar/hold-calendar';
import { describeHold } from '../../shared/holds';
import { describeZone, formatWindow, todayIn, windowLength } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import { StatusPill } from '../../shared/status-pill/status-pill';
import { modelCategoryLabels, unitStatusLabels } from '@evalon/contracts/values';
import { unitStatusIcons, unitStatusTones } from './unit-status';
import { LenderCatalogApi } from '../catalog/lender-catalog-api';
import { MaintenanceDialog, MaintenanceDialogData } from './maintenance-dialog';
import { UnitDialog, UnitDialogData } from './unit-dialog';
import { UnitsApi } from './units-api';

/** A hold with what the list shows already worked out. */
interface HoldRow {
  readonly hold: Hold;
  readonly when: string;
  readonly days: number;
  readonly what: string;
  /** Whether the hold covers today. */
  readonly now: boolean;
}

/** Earlier holds shown below the coming ones; older history stays on the server. */
const earlierShown = 10;

/**
 * One unit: its details, its holds (loan footprints and maintenance) as a list and on a month
 * calendar, and — for fleet managers — changes, maintenance blocks and their removal.
 */
@Component({
  selector: 'ev-unit-detail',
  imports: [
    Cautions,
    EmptyState,
    HoldCalendar,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatTooltipModule,
    PageHeader,
    RouterLink,
    StatusPill,
  ],
  templateUrl: './unit-detail.html',
  styleUrl: './unit-detail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitDetail {
  private readonly api = inject(UnitsApi);
  private readonly catalog = inject(LenderCatalogApi);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);

  /** `:unitId` from the route. */
  readonly unitId = input.required<string>();

  protected readonly statusTones = unitStatusTones;
  protected readonly id = computed(() => Number(this.unitId()));
  /** Whether the person may change the unit and its maintenance (fleet managers). */
  protected readonly canEdit = computed(() => this.session.hasAnyRole(['fleet_manager']));

  protected readonly unit = signal<Unit | null>(null);
  protected readonly holds = signal<Hold[]>([]);
  protected readonly loading = signal(false);
  protected readonly loadError = signal<string | null>(null);
  protected readonly removing = signal<number | null>(null);
  protected readonly month = signal(monthOf(todayIn()));

  protected readonly today = computed(() => todayIn(this.unit()?.homeDepotTimeZone));
  protected readonly statusLabel = computed(() => {
    const unit = this.unit();
    return unit ? unitStatusLabels[unit.status] : '';
  });
  protected readonly statusIcon = computed(() => {
    const unit = this.unit();
    return unit ? unitStatusIcons[unit.status] : '';
  });
  protected readonly categoryLabel = computed(() => {
    const unit = this.unit();
    return unit ? modelCategoryLabels[unit.category] : '';
  });
  protected readonly zone = computed(() => {
    const unit = this.unit();
    return unit ? describeZone(unit.homeDepotTimeZone) : '';
  });

  private readonly rows = computed<HoldRow[]>(() => {
    const today = this.today();
    return [...this.holds()]
      .sort((a, b) => a.start.localeCompare(b.start))
      .map((hold) => ({
        hold,
        when: formatWindow(hold.start, hold.end),
        days: windowLength(hold.start, hold.end),
        what: describeHold(hold),
        now: hold.start <= today && today <= hold.end,
      }));
  });
  protected readonly coming = computed(() => this.rows().filter((r) => r.hold.end >= this.today()));
  protected readonly earlier = computed(() =>
    this.rows()
      .filter((r) => r.hold.end < this.today())
      .reverse()
      .slice(0, earlierShown),
  );

  constructor() {
    effect(() => {
      const id = this.id();
      untracked(() => void this.load(id));
    });
  }

  protected reload(): void {
    void this.load(this.id());
  }

  /** Shows the month of a hold in the calendar. */
  protected showOnCalendar(hold: Hold): void {
    this.month.set(monthOf(hold.start));
  }

  protected async edit(): Promise<void> {
    const unit = this.unit();
    if (!unit) return;
    try {
      const [models, depots] = await Promise.all([
        firstValueFrom(this.catalog.models(unit.lenderId)),
        firstValueFrom(this.catalog.depots(unit.lenderId)),
      ]);
      const saved = await firstValueFrom(
        this.dialog
          .open<UnitDialog, UnitDialogData, Unit>(UnitDialog, {
            data: {
              unit,
              models: models.map((m) => ({ id: m.id, name: m.name })),
              depots: depots.map((d) => ({ id: d.id, name: d.name })),
            },
            width: '520px',
            maxWidth: 'calc(100vw - 32px)',
          })
          .afterClosed(),
      );
      if (!saved) return;
      this.unit.set(saved);
      this.notifier.success(`Unit ${saved.serialNumber} is saved.`);
    } catch (error) {
      this.notifier.error(error);
    }
  }

  /** Opens the maintenance dialog, starting on `start` when a free day was chosen. */
  protected async block(start?: string): Promise<void> {
    const unit = this.unit();
    if (!unit || !this.canEdit()) return;
    const hold = await firstValueFrom(
      this.dialog
        .open<MaintenanceDialog, MaintenanceDialogData, Hold>(MaintenanceDialog, {
          data: { unit, start: start ?? null },
          width: '520px',
          maxWidth: 'calc(100vw - 32px)',
        })
        .afterClosed(),
    );
    if (!hold) return;
    this.holds.update((list) => [...list, hold]);
    this.month.set(monthOf(hold.start));
    this.notifier.success(
      `Unit ${unit.serialNumber} is blocked ${formatWindow(hold.start, hold.end)}.`,
    );
  }

  /** A free day chosen on the calendar starts a maintenance block there. */
  protected dayChosen(day: CalendarDay): void {
    if (!this.canEdit() || day.holds.length || day.date < this.today()) return;
    void this.block(day.date);
  }

  protected async remove(row: HoldRow): Promise<void> {
    const unit = this.unit();
    if (!unit) return;
    const confirmed = await firstValueFrom(
      confirmAction(this.dialog, {
        title: 'Remove this maintenance block?',
        message: `Unit ${unit.serialNumber} becomes available again ${row.when}, unless something else holds it.`,
        confirmLabel: 'Remove block',
        destructive: true,
      }),
    );
    if (!confirmed) return;
    this.removing.set(row.hold.id);
    try {
      await firstValueFrom(this.api.removeHold(unit.id, row.hold.id), { defaultValue: undefined });
      this.holds.update((list) => list.filter((h) => h.id !== row.hold.id));
      this.notifier.success('Maintenance block removed.');
    } catch (error) {
      this.notifier.error(error);
    } finally {
      this.removing.set(null);
    }
  }

  private async load(id: number): Promise<void> {
    if (!Number.isInteger(id) || id <= 0) {
      this.loadError.set('This address does not name a unit.');
      return;
    }
    this.loading.set(true);
    this.loadError.set(null);
    try {
      const [unit, holds] = await Promise.all([
        firstValueFrom(this.api.unit(id)),
        firstValueFrom(this.api.holds(id)),
      ]);
      if (id !== this.id()) return;
      this.unit.set(unit);
      this.holds.set(holds);
      // Open the calendar on the current or next hold, else on this month.
      const today = todayIn(unit.homeDepotTimeZone);
      const next = holds
        .filter((h) => h.end >= today)
        .sort((a, b) => a.start.localeCompare(b.start))[0];
      this.month.set(monthOf(next && next.start > today ? next.start : today));
    } catch (error) {
      if (id === this.id()) this.loadError.set(messageOf(error));
    } finally {
      if (id === this.id()) this.loading.set(false);
    }
  }
}
