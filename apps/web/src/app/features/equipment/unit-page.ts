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
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { DecimalPipe } from '@angular/common';
import { GoogleMap, MapMarker } from '@angular/google-maps';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import type { AvailabilityItem, Hold, Model, Site, Unit } from '@evalon/contracts';
import { DateTime } from 'luxon';
import { catchError, map, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { CatalogApi } from '../../shared/catalog-api';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { DayPipe, MoneyPipe, WindowPipe } from '../../shared/formats';
import { CalendarRange, HoldCalendar, monthOf } from '../../shared/hold-calendar/hold-calendar';
import { addDays, describeZone, isIsoDate, todayIn } from '../../shared/iso-date';
import { LoanDraft, addOutcomeMessage, draftUnitOf } from '../../shared/loan-draft';
import { modelCategoryLabels } from '@evalon/contracts/values';
import { MapsLoader } from '../../shared/maps-loader';
import { PageHeader } from '../../shared/page-header/page-header';

/** Days a sample window starts ahead of today when the page was opened without case days. */
export const SAMPLE_WINDOW_LEAD_DAYS = 28;
/** Length of that sample window (first to last case day, both counted). */
export const SAMPLE_WINDOW_DAYS = 3;

/** What the page shows about the unit, loaded together. */
interface UnitDetails {
  readonly unit: Unit;
  readonly model: Model;
}

/**
 * One unit: the model's photos, description and packing list, its depot, a month calendar of
 * its holds with the footprint the buyer's dates would need, and a map of the depot and the
 * campus with the great-circle distance between them.
 */
@Component({
  selector: 'ev-unit-page',
  imports: [
    Cautions,
    DayPipe,
    DecimalPipe,
    EmptyState,
    GoogleMap,
    HoldCalendar,
    MapMarker,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatSelectModule,
    MoneyPipe,
    PageHeader,
    RouterLink,
    WindowPipe,
  ],
  templateUrl: './unit-page.html',
  styleUrl: './unit-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitPage {
  private readonly api = inject(CatalogApi);
  private readonly session = inject(SessionStore);
  private readonly notifier = inject(Notifier);
  protected readonly draft = inject(LoanDraft);
  protected readonly maps = inject(MapsLoader);

  /** `:unitId` from the path. */
  readonly unitId = input.required<string>();
  /** `?siteId=` the campus the buyer searched for. */
  readonly siteId = input<string>();
  /** `?from=` first case day. */
  readonly from = input<string>();
  /** `?to=` last case day. */
  readonly to = input<string>();
  /** `?category=` of the search that led here, kept for "Back to results". */
  readonly category = input<string>();
  /** `?q=` words of the search that led here, kept for "Back to results". */
  readonly q = input<string>();
  /** `?worksWith=` model filter of the search that led here, kept for "Back to results". */
  readonly worksWith = input<string>();

  protected readonly categoryLabels = modelCategoryLabels;

  protected readonly details = signal<UnitDetails | null>(null);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  protected readonly sites = signal<Site[]>([]);

  protected readonly campuses = computed(() => {
    const organisationId = this.session.activeOrganisation()?.id;
    return this.sites().filter(
      (s) =>
        s.kind === 'campus' &&
        (organisationId === undefined || s.organisationId === organisationId),
    );
  });
  /** The campus picked on this page (starts with the one from the search). */
  protected readonly chosenCampusId = signal<number | null>(null);
  protected readonly campus = computed<Site | null>(() => {
    const campuses = this.campuses();
    const wanted = this.chosenCampusId() ?? Number(this.siteId());
    return campuses.find((c) => c.id === wanted) ?? campuses[0] ?? null;
  });
  protected readonly depot = computed<Site | null>(() => {
    const unit = this.details()?.unit;
    return unit ? (this.sites().find((s) => s.id === unit.homeDepotId) ?? null) : null;
  });

  /** Whether the case days came from the search (otherwise a sample window is used). */
  protected readonly hasDates = computed(() => isIsoDate(this.from()) && isIsoDate(this.to()));
  protected readonly window = computed(() => {
    const from = this.from();
    const to = this.to();
    if (isIsoDate(from) && isIsoDate(to) && to >= from) return { useFrom: from, useTo: to };
    const start = addDays(todayIn(this.campus()?.timeZone), SAMPLE_WINDOW_LEAD_DAYS);
    return { useFrom: start, useTo: addDays(start, SAMPLE_WINDOW_DAYS - 1) };
  });

  /** This unit as the availability search sees it for the campus and window. */
  protected readonly fit = signal<AvailabilityItem | null>(null);
  protected readonly fitLoading = signal(false);
  protected readonly fitError = signal<string | null>(null);

  /** Today in the depot's calendar, which the unit's holds are written in. */
  protected readonly depotToday = computed(() => todayIn(this.details()?.unit.homeDepotTimeZone));

  /** The month the calendar shows. */
  protected readonly month = signal(monthOf(todayIn()));
  protected readonly holds = signal<Hold[]>([]);
  protected readonly holdsLoading = signal(false);
  protected readonly holdsError = signal<string | null>(null);
  /** Bumped by "Try again" on the calendar. */
  private readonly holdsStamp = signal(0);

  protected readonly footprint = computed<CalendarRange | null>(() => {
    const fit = this.fit();
    if (!fit) return null;
    return {
      start: fit.milestones.shipBy,
      end: fit.milestones.readyAgain,
      label: this.hasDates() ? 'Needed for your dates' : 'Needed for the sample dates',
    };
  });

  protected readonly calendarCaption = computed(() => {
    const unit = this.details()?.unit;
    if (!unit) return null;
    return `Days in the depot’s calendar, ${describeZone(unit.homeDepotTimeZone)}. Each hold covers shipping, the stay at the hospital, the return and reprocessing.`;
  });

  protected readonly mapOptions: google.maps.MapOptions = {
    zoom: 4,
    center: { lat: 39.5, lng: -95 },
    disableDefaultUI: true,
    zoomControl: true,
    clickableIcons: false,
  };
  protected readonly depotPosition = computed(() => {
    const d = this.depot();
    return d ? { lat: d.latitude, lng: d.longitude } : null;
  });
  protected readonly campusPosition = computed(() => {
    const c = this.campus();
    return c ? { lat: c.latitude, lng: c.longitude } : null;
  });
  private map: google.maps.Map | null = null;

  constructor() {
    void this.maps.load().catch(() => undefined);

    this.api
      .sites()
      .pipe(takeUntilDestroyed())
      .subscribe({ next: (sites) => this.sites.set(sites), error: () => this.sites.set([]) });

    // Unit and model whenever the path changes.
    toObservable(this.unitId)
      .pipe(
        tap(() => {
          this.loading.set(true);
          this.loadError.set(null);
        }),
        switchMap((id) =>
          this.api.unit(Number(id)).pipe(
            switchMap((unit) =>
              this.api.model(unit.modelId).pipe(map((model) => ({ unit, model }))),
            ),
            catchError((error: unknown) => {
              this.loadError.set(messageOf(error));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((details) => {
        this.details.set(details);
        this.loading.set(false);
      });

    // Start the calendar on the month of the first case day.
    effect(() => {
      const start = this.window().useFrom;
      untracked(() => this.month.set(monthOf(start)));
    });

    // Holds for the month shown, with a margin so days from the neighbouring months are right.
    toObservable(
      computed(() => ({
        unitId: Number(this.unitId()),
        month: this.month(),
        stamp: this.holdsStamp(),
      })),
    )
      .pipe(
        tap(() => {
          this.holdsLoading.set(true);
          this.holdsError.set(null);
        }),
        switchMap(({ unitId, month }) => {
          const first = `${month}-01`;
          const last = DateTime.fromISO(first, { zone: 'utc' }).endOf('month').toISODate()!;
          return this.api.holds(unitId, addDays(first, -7), addDays(last, 14)).pipe(
            catchError((error: unknown) => {
              this.holdsError.set(messageOf(error));
              return of<Hold[]>([]);
            }),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((holds) => {
        this.holds.set(holds);
        this.holdsLoading.set(false);
      });

    // The unit's fit for the campus and window: footprint, distance, transit, deposit.
    toObservable(
      computed(() => {
        const details = this.details();
        const campus = this.campus();
        const window = this.window();
        return details && campus
          ? { modelId: details.unit.modelId, unitId: details.unit.id, siteId: campus.id, ...window }
          : null;
      }),
    )
      .pipe(
        tap((query) => {
          this.fit.set(null);
          this.fitError.set(null);
          this.fitLoading.set(query !== null);
        }),
        switchMap((query) =>
          query
            ? this.api
                .availability({
                  modelId: query.modelId,
                  siteId: query.siteId,
                  useFrom: query.useFrom,
                  useTo: query.useTo,
                })
                .pipe(
                  map((r) => r.items.find((i) => i.unitId === query.unitId) ?? null),
                  catchError((error: unknown) => {
                    this.fitError.set(messageOf(error));
                    return of(null);
                  }),
                )
            : of(null),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((fit) => {
        this.fit.set(fit);
        this.fitLoading.set(false);
      });

    // Keep both markers in view when the campus changes.
    effect(() => {
      const a = this.depotPosition();
      const b = this.campusPosition();
      if (a && b) untracked(() => this.fitMap());
    });
  }

  protected reloadHolds(): void {
    this.holdsStamp.update((n) => n + 1);
  }

  protected onMapReady(map: google.maps.Map): void {
    this.map = map;
    this.fitMap();
  }

  protected chooseCampus(id: number): void {
    this.chosenCampusId.set(id);
  }

  protected toggleDraft(): void {
    const fit = this.fit();
    if (!fit) return;
    if (this.draft.has(fit.unitId)) {
      this.draft.remove(fit.unitId);
      return;
    }
    const campus = this.campus();
    const w = this.window();
    this.draft.setWindow(campus?.id ?? null, w.useFrom, w.useTo);
    const problem = addOutcomeMessage(
      this.draft.add(draftUnitOf(fit)),
      this.draft.lender()?.name ?? null,
    );
    if (problem) this.notifier.error(problem);
    else this.notifier.success(`${fit.serialNumber} is in your request.`);
  }

  protected requestLink(): Record<string, string | number | undefined> {
    const d = this.draft.value();
    return {
      siteId: d.siteId ?? undefined,
      from: d.useFrom ?? undefined,
      to: d.useTo ?? undefined,
    };
  }

  protected searchLink(): Record<string, string | number | undefined> {
    const filters = { category: this.category(), q: this.q(), worksWith: this.worksWith() };
    if (!this.hasDates()) return { ...filters, siteId: this.campus()?.id };
    return { ...filters, siteId: this.campus()?.id, from: this.from(), to: this.to() };
  }

  protected packingCount(model: Model): { items: number; pieces: number; serialised: number } {
    return {
      items: model.packingList.length,
      pieces: model.packingList.reduce((n, i) => n + i.quantity, 0),
      serialised: model.packingList.filter((i) => i.serialised).length,
    };
  }

  private fitMap(): void {
    const a = this.depotPosition();
    const b = this.campusPosition();
    if (!this.map || !a || !b || typeof google === 'undefined') return;
    const bounds = new google.maps.LatLngBounds();
    bounds.extend(a);
    bounds.extend(b);
    this.map.fitBounds(bounds, 56);
  }
}
