import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
} from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { provideNativeDateAdapter } from '@angular/material/core';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type {
  AvailabilityItem,
  AvailabilityResponse,
  Model,
  ModelCategory,
  Site,
} from '@evalon/contracts';
import { Subscription, forkJoin, map, startWith } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import {
  caseDaysControls,
  caseDaysError,
  caseDaysErrorShown,
  caseDaysValidator,
} from '../../shared/case-days';
import { CatalogApi } from '../../shared/catalog-api';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { MoneyPipe, WindowPipe, sumMoney } from '../../shared/formats';
import { IsoDate, fromIsoDate, isIsoDate, toIsoDate, todayIn } from '../../shared/iso-date';
import { LoanDraft } from '../../shared/loan-draft';
import {
  availabilityHorizonDays,
  maxUseWindowDays,
  modelCategories,
  modelCategoryLabels,
} from '@evalon/contracts/values';
import { PageHeader } from '../../shared/page-header/page-header';
import { AvailabilityRow, DatesChoice, SearchWindow } from './availability-row';

/** Results of one model, in the order the server ranked them (fitting units first). */
export interface ModelGroup {
  readonly modelId: number;
  readonly modelName: string;
  readonly category: ModelCategory;
  readonly lenderName: string;
  readonly units: readonly AvailabilityItem[];
  readonly feasibleCount: number;
  /** Lead days when this would be the hospital's first loan of the model, else null. */
  readonly firstLoanLeadDays: number | null;
}

/** Groups search results by model, keeping the server's order of first appearance. */
export function groupByModel(items: readonly AvailabilityItem[]): ModelGroup[] {
  const groups = new Map<number, AvailabilityItem[]>();
  for (const item of items) {
    const list = groups.get(item.modelId) ?? [];
    list.push(item);
    groups.set(item.modelId, list);
  }
  return [...groups.values()].map((units) => ({
    modelId: units[0]!.modelId,
    modelName: units[0]!.modelName,
    category: units[0]!.category,
    lenderName: units[0]!.lenderName,
    units,
    feasibleCount: units.filter((u) => u.feasible).length,
    firstLoanLeadDays: units.find((u) => u.firstLoanOfModel)?.leadDays ?? null,
  }));
}

/** The search the page runs, taken from the address bar so back/forward and links work. */
interface Criteria {
  readonly siteId: number;
  readonly useFrom: IsoDate;
  readonly useTo: IsoDate;
  readonly category: ModelCategory | null;
  readonly q: string | null;
  readonly compatibleWith: number | null;
}

/**
 * Find equipment: search lenders' units by category, words and compatibility for a campus and
 * case days, and see for each unit whether it can be there, when it ships and arrives, how far
 * it travels and its deposit; pick units for one request (all or nothing).
 */
@Component({
  selector: 'ev-equipment-search',
  imports: [
    AvailabilityRow,
    Cautions,
    EmptyState,
    MatAutocompleteModule,
    MatButtonModule,
    MatCardModule,
    MatDatepickerModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MoneyPipe,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
    WindowPipe,
  ],
  providers: [provideNativeDateAdapter()],
  templateUrl: './equipment-search.html',
  styleUrl: './equipment-search.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EquipmentSearch {
  private readonly api = inject(CatalogApi);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly draft = inject(LoanDraft);

  /** `?category=` from the address bar. */
  readonly category = input<string>();
  /** `?q=` */
  readonly q = input<string>();
  /** `?worksWith=` a model id. */
  readonly worksWith = input<string>();
  /** `?siteId=` one of the person's campuses. */
  readonly siteId = input<string>();
  /** `?from=` first case day. */
  readonly from = input<string>();
  /** `?to=` last case day. */
  readonly to = input<string>();

  protected readonly categories = modelCategories;
  protected readonly categoryLabels = modelCategoryLabels;
  protected readonly maxWindow = maxUseWindowDays;
  protected readonly horizonDays = availabilityHorizonDays;

  protected readonly sites = signal<Site[]>([]);
  protected readonly models = signal<Model[]>([]);
  /** Whether sites and models have arrived. */
  protected readonly setupLoaded = signal(false);
  protected readonly setupError = signal<string | null>(null);

  protected readonly campuses = computed(() => {
    const organisationId = this.session.activeOrganisation()?.id;
    return this.sites().filter(
      (s) =>
        s.kind === 'campus' &&
        (organisationId === undefined || s.organisationId === organisationId),
    );
  });
  private readonly depots = computed(
    () =>
      new Map(
        this.sites()
          .filter((s) => s.kind === 'depot')
          .map((s) => [s.id, s]),
      ),
  );

  protected readonly form = new FormGroup(
    {
      category: new FormControl<ModelCategory | ''>('', { nonNullable: true }),
      q: new FormControl('', { nonNullable: true, validators: [Validators.maxLength(100)] }),
      worksWith: new FormControl<Model | string | null>(null, {
        validators: [
          (c) => (typeof c.value === 'string' && c.value.trim() ? { pickModel: true } : null),
        ],
      }),
      siteId: new FormControl<number | null>(null, { validators: [Validators.required] }),
      ...caseDaysControls(),
    },
    { validators: [caseDaysValidator((): IsoDate => this.campusToday())] },
  );

  private readonly formValue = toSignal(
    this.form.valueChanges.pipe(
      startWith(null),
      map(() => this.form.getRawValue()),
    ),
    { requireSync: true },
  );

  /** The chosen campus. */
  protected readonly campus = computed<Site | null>(
    () => this.campuses().find((c) => c.id === this.formValue().siteId) ?? null,
  );
  /** Today at the chosen campus (the server refuses earlier first case days). */
  protected readonly campusToday = computed<IsoDate>(() => todayIn(this.campus()?.timeZone));
  protected readonly minDate = computed(() => fromIsoDate(this.campusToday()));

  /** Models offered for "compatible with", filtered by what is typed. */
  protected readonly modelOptions = computed(() => {
    const typed = this.formValue().worksWith;
    const text = typeof typed === 'string' ? typed.trim().toLowerCase() : '';
    const all = this.models();
    return text ? all.filter((m) => m.name.toLowerCase().includes(text)) : all;
  });

  /** The search in the address bar, when it is complete. */
  protected readonly criteria = computed<Criteria | null>(() => {
    const siteId = Number(this.siteId());
    const useFrom = this.from();
    const useTo = this.to();
    if (!Number.isInteger(siteId) || siteId <= 0 || !isIsoDate(useFrom) || !isIsoDate(useTo)) {
      return null;
    }
    const category = this.category();
    const worksWith = Number(this.worksWith());
    return {
      siteId,
      useFrom,
      useTo,
      category:
        category && (modelCategories as readonly string[]).includes(category)
          ? (category as ModelCategory)
          : null,
      q: this.q()?.trim() || null,
      compatibleWith: Number.isInteger(worksWith) && worksWith > 0 ? worksWith : null,
    };
  });

  protected readonly searchWindow = computed<SearchWindow | null>(() => {
    const c = this.criteria();
    return c ? { siteId: c.siteId, useFrom: c.useFrom, useTo: c.useTo } : null;
  });
  protected readonly searchedCampus = computed<Site | null>(
    () => this.campuses().find((c) => c.id === this.criteria()?.siteId) ?? null,
  );

  protected readonly results = signal<AvailabilityResponse | null>(null);
  protected readonly loading = signal(false);
  protected readonly searchError = signal<string | null>(null);
  /** Bumped by "Search" so the same criteria can be searched again. */
  private readonly attempt = signal(0);
  private running: Subscription | null = null;

  protected readonly groups = computed(() => groupByModel(this.results()?.items ?? []));
  protected readonly feasibleCount = computed(
    () => (this.results()?.items ?? []).filter((i) => i.feasible).length,
  );
  protected readonly draftDeposit = computed(() =>
    sumMoney(this.draft.units().map((u) => u.deposit)),
  );
  protected readonly draftLink = computed(() => {
    const d = this.draft.value();
    return {
      siteId: d.siteId ?? undefined,
      from: d.useFrom ?? undefined,
      to: d.useTo ?? undefined,
    };
  });

  constructor() {
    forkJoin([this.api.sites(), this.api.models()])
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: ([sites, models]) => {
          this.sites.set(sites);
          this.models.set(models);
          this.setupLoaded.set(true);
          this.syncFormFromAddress();
        },
        error: (error: unknown) => {
          this.setupError.set(messageOf(error));
          this.setupLoaded.set(true);
        },
      });

    // The address bar is the source of truth: fill the form from it and search when complete.
    effect(() => {
      this.criteria();
      this.worksWith();
      untracked(() => this.syncFormFromAddress());
    });
    effect(() => {
      const criteria = this.criteria();
      this.attempt();
      untracked(() => this.search(criteria));
    });
    this.destroyRef.onDestroy(() => this.running?.unsubscribe());
  }

  /** Validates the form and puts the search in the address bar (which runs it). */
  protected submit(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    const v = this.form.getRawValue();
    const worksWith = v.worksWith && typeof v.worksWith === 'object' ? v.worksWith.id : undefined;
    const queryParams = {
      category: v.category || undefined,
      q: v.q.trim() || undefined,
      worksWith,
      siteId: v.siteId ?? undefined,
      from: v.useFrom ? toIsoDate(v.useFrom) : undefined,
      to: v.useTo ? toIsoDate(v.useTo) : undefined,
    };
    const before = this.router.url;
    void this.router.navigate(['/equipment'], { queryParams }).then(() => {
      // Same address as before: the navigation changed nothing, so search again explicitly.
      if (this.router.url === before) this.attempt.update((n) => n + 1);
    });
  }

  /** Searches again with the earliest dates a unit offered. */
  protected useDates(choice: DatesChoice): void {
    this.form.patchValue({
      useFrom: fromIsoDate(choice.useFrom),
      useTo: fromIsoDate(choice.useTo),
    });
    this.submit();
  }

  /** Clears the filters but keeps the campus and the case days. */
  protected clearFilters(): void {
    this.form.patchValue({ category: '', q: '', worksWith: null });
    this.submit();
  }

  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  protected displayModel = (value: Model | string | null): string =>
    value && typeof value === 'object' ? value.name : (value ?? '');

  protected clearWorksWith(): void {
    this.form.controls.worksWith.setValue(null);
  }

  protected depotPlace(depotId: number): string | null {
    const depot = this.depots().get(depotId);
    return depot ? `${depot.city}, ${depot.country}` : null;
  }

  /** The words under the case-days field, first problem first. */
  protected dateError(): string | null {
    return caseDaysError(this.form);
  }

  /** Whether the case-days field shows its problem (after a touch or a search attempt). */
  protected dateErrorShown(): boolean {
    return caseDaysErrorShown(this.form);
  }

  private syncFormFromAddress(): void {
    const criteria = this.criteria();
    const campuses = this.campuses();
    const worksWithId = Number(this.worksWith());
    const worksWith = this.models().find((m) => m.id === worksWithId) ?? null;
    const siteId =
      criteria && campuses.some((c) => c.id === criteria.siteId)
        ? criteria.siteId
        : (this.form.controls.siteId.value ?? campuses[0]?.id ?? null);
    this.form.patchValue({
      category: criteria ? (criteria.category ?? '') : (this.category() as ModelCategory) || '',
      q: criteria ? (criteria.q ?? '') : (this.q() ?? ''),
      worksWith,
      siteId,
      ...(criteria
        ? { useFrom: fromIsoDate(criteria.useFrom), useTo: fromIsoDate(criteria.useTo) }
        : {}),
    });
  }

  private search(criteria: Criteria | null): void {
    this.running?.unsubscribe();
    this.searchError.set(null);
    if (!criteria) {
      this.results.set(null);
      this.loading.set(false);
      return;
    }
    this.loading.set(true);
    this.running = this.api.availability(criteria).subscribe({
      next: (response) => {
        this.results.set(response);
        this.loading.set(false);
      },
      error: (error: unknown) => {
        this.results.set(null);
        this.searchError.set(messageOf(error));
        this.loading.set(false);
      },
    });
  }
}
