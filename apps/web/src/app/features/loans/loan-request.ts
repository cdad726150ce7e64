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
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { provideNativeDateAdapter } from '@angular/material/core';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { StepperSelectionEvent } from '@angular/cdk/stepper';
import { MatStepper, MatStepperModule } from '@angular/material/stepper';
import { Router, RouterLink } from '@angular/router';
import type {
  AlternativeItem,
  AvailabilityItem,
  CreateLoanRequest,
  Site,
  UnitUnavailableDetails,
} from '@evalon/contracts';
import { Subscription, catchError, forkJoin, map, of, startWith, switchMap } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
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
import { DayPipe, MoneyPipe, WindowPipe, sumMoney } from '../../shared/formats';
import {
  IsoDate,
  addDays,
  fromIsoDate,
  isIsoDate,
  toIsoDate,
  todayIn,
  windowLength,
} from '../../shared/iso-date';
import { DraftUnit, LoanDraft, addOutcomeMessage, draftUnitOf } from '../../shared/loan-draft';
import { loanNoteMaxLength, modelCategoryLabels } from '@evalon/contracts/values';
import {
  MilestoneTimeline,
  TimelineSite,
} from '../../shared/milestone-timeline/milestone-timeline';
import { PageHeader } from '../../shared/page-header/page-header';
import { LoanApi } from './loan-api';

/** Campus and case days, once the first step is valid. */
export interface RequestWindow {
  readonly siteId: number;
  readonly useFrom: IsoDate;
  readonly useTo: IsoDate;
}

/** A chosen unit with its check for the window (null while unknown or when not offered). */
export interface UnitCheck {
  readonly unit: DraftUnit;
  readonly item: AvailabilityItem | null;
}

/** A unit the server refused, in words, with its earliest fitting window. */
export interface ConflictView {
  readonly unitId: number;
  readonly name: string;
  readonly reason: string;
  readonly earliest: { useFrom: IsoDate; useTo: IsoDate } | null;
  /** Units of the same model that could take its place on the same days. */
  readonly alternatives: readonly AlternativeItem[];
}

/** The answer of the availability checks for one window and set of units. */
interface Checks {
  readonly key: string;
  readonly items: ReadonlyMap<number, AvailabilityItem>;
  /** Feasible units of models compatible with the chosen ones, not chosen yet. */
  readonly compatible: readonly AvailabilityItem[];
}

/** Most compatible units offered per model (the best-ranked ones). */
export const COMPATIBLE_PER_MODEL = 3;

/** Whether `details` look like the 409 `unit_unavailable` details of the contract. */
function isUnavailableDetails(details: unknown): details is UnitUnavailableDetails {
  return (
    !!details &&
    typeof details === 'object' &&
    Array.isArray((details as UnitUnavailableDetails).conflicts) &&
    Array.isArray((details as UnitUnavailableDetails).alternatives)
  );
}

/**
 * Request a loan in three steps: campus and case days; the units (with compatible accessories
 * found by availability); a review with each unit's milestones, the deposit estimate, a note
 * and the cautions. A refused request (409) names the units that no longer fit and offers
 * their earliest dates and stand-ins without losing what was entered.
 */
@Component({
  selector: 'ev-loan-request',
  imports: [
    Cautions,
    DayPipe,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatDatepickerModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatStepperModule,
    MilestoneTimeline,
    MoneyPipe,
    PageHeader,
    ReactiveFormsModule,
    RouterLink,
    WindowPipe,
  ],
  providers: [provideNativeDateAdapter()],
  templateUrl: './loan-request.html',
  styleUrl: './loan-request.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanRequest {
  private readonly loans = inject(LoanApi);
  private readonly catalog = inject(CatalogApi);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);
  private readonly notifier = inject(Notifier);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly draft = inject(LoanDraft);

  /** `?siteId=` campus to start with. */
  readonly siteId = input<string>();
  /** `?from=` first case day to start with. */
  readonly from = input<string>();
  /** `?to=` last case day to start with. */
  readonly to = input<string>();
  /** `?unitIds=1,2` units to add to the request. */
  readonly unitIds = input<string>();

  protected readonly categoryLabels = modelCategoryLabels;
  protected readonly noteMax = loanNoteMaxLength;
  private readonly stepper = viewChild(MatStepper);

  protected readonly sites = signal<Site[]>([]);
  protected readonly sitesError = signal<string | null>(null);
  protected readonly campuses = computed(() => {
    const organisationId = this.session.activeOrganisation()?.id;
    return this.sites().filter(
      (s) =>
        s.kind === 'campus' &&
        (organisationId === undefined || s.organisationId === organisationId),
    );
  });

  protected readonly windowForm = new FormGroup(
    {
      siteId: new FormControl<number | null>(null, { validators: [Validators.required] }),
      ...caseDaysControls(),
    },
    { validators: [caseDaysValidator((): IsoDate => this.campusToday())] },
  );
  protected readonly note = new FormControl('', {
    nonNullable: true,
    validators: [Validators.maxLength(loanNoteMaxLength)],
  });

  private readonly windowValue = toSignal(
    this.windowForm.valueChanges.pipe(
      startWith(null),
      map(() => ({ ...this.windowForm.getRawValue(), valid: this.windowForm.valid })),
    ),
    { requireSync: true },
  );

  protected readonly campus = computed<Site | null>(
    () => this.campuses().find((c) => c.id === this.windowValue().siteId) ?? null,
  );
  protected readonly campusSite = computed<TimelineSite | null>(() => {
    const c = this.campus();
    return c ? { name: c.name, timeZone: c.timeZone } : null;
  });
  protected readonly campusToday = computed<IsoDate>(() => todayIn(this.campus()?.timeZone));
  protected readonly minDate = computed(() => fromIsoDate(this.campusToday()));

  /** The campus and case days once step one is valid. */
  protected readonly window = computed<RequestWindow | null>(() => {
    const v = this.windowValue();
    if (!v.valid || v.siteId === null || !v.useFrom || !v.useTo) return null;
    return { siteId: v.siteId, useFrom: toIsoDate(v.useFrom), useTo: toIsoDate(v.useTo) };
  });

  private readonly checkKey = computed(() => {
    const w = this.window();
    const ids = this.draft
      .units()
      .map((u) => u.unitId)
      .sort((a, b) => a - b);
    return w && ids.length ? `${w.siteId}|${w.useFrom}|${w.useTo}|${ids.join(',')}` : null;
  });
  protected readonly checks = signal<Checks | null>(null);
  protected readonly checking = signal(false);
  protected readonly checkError = signal<string | null>(null);
  private checkRun: Subscription | null = null;

  /** Whether the checks on screen belong to the current window and units. */
  protected readonly checksCurrent = computed(() => {
    const key = this.checkKey();
    return key !== null && this.checks()?.key === key && !this.checking();
  });

  protected readonly rows = computed<UnitCheck[]>(() => {
    const checks = this.checksCurrent() ? this.checks() : null;
    return this.draft
      .units()
      .map((unit) => ({ unit, item: checks?.items.get(unit.unitId) ?? null }));
  });
  /** Whether every chosen unit fits the window (so the request can go). */
  /**
   * Steps the person has opened (the first is open from the start). A step counts as completed
   * only once opened, so Material's header does not offer the edit pencil on a step the person
   * has not seen yet (e.g. units that already fit when the request starts).
   */
  protected readonly openedSteps = signal<ReadonlySet<number>>(new Set([0]));

  protected readonly allFit = computed(
    () =>
      this.checksCurrent() && this.rows().length > 0 && this.rows().every((r) => r.item?.feasible),
  );
  protected readonly depositTotal = computed(() =>
    sumMoney(this.rows().map((r) => r.item?.deposit ?? r.unit.deposit)),
  );
  protected readonly compatibleGroups = computed(() => {
    const checks = this.checksCurrent() ? this.checks() : null;
    // Suggest other kinds of equipment: a second unit of a model already chosen is not an
    // accessory (and compatibility runs both ways, so the chosen models come back otherwise).
    const chosenModels = new Set(this.draft.units().map((u) => u.modelId));
    const groups = new Map<number, AvailabilityItem[]>();
    for (const item of checks?.compatible ?? []) {
      if (chosenModels.has(item.modelId)) continue;
      const list = groups.get(item.modelId) ?? [];
      if (list.length < COMPATIBLE_PER_MODEL) list.push(item);
      groups.set(item.modelId, list);
    }
    return [...groups.values()].map((units) => ({
      modelId: units[0]!.modelId,
      modelName: units[0]!.modelName,
      category: units[0]!.category,
      units,
    }));
  });

  protected readonly sending = signal(false);
  protected readonly conflicts = signal<ConflictView[] | null>(null);
  protected readonly conflictMessage = signal<string | null>(null);
  protected readonly submitError = signal<string | null>(null);

  constructor() {
    this.catalog
      .sites()
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: (sites) => {
          this.sites.set(sites);
          this.prefillWindow();
        },
        error: (error: unknown) => this.sitesError.set(messageOf(error)),
      });

    // Units named in the address join the draft (e.g. "Request this unit" from elsewhere).
    effect(() => {
      const ids = (this.unitIds() ?? '')
        .split(',')
        .map(Number)
        .filter((n) => Number.isInteger(n) && n > 0);
      untracked(() => this.addUnitsFromAddress(ids));
    });

    // Re-check the units whenever the window or the units change.
    effect(() => {
      const key = this.checkKey();
      untracked(() => this.runChecks(key));
    });

    // Keep the draft's window in step, so Find equipment and a reload keep the dates.
    effect(() => {
      const w = this.window();
      if (w) untracked(() => this.draft.setWindow(w.siteId, w.useFrom, w.useTo));
    });

    this.destroyRef.onDestroy(() => this.checkRun?.unsubscribe());
  }

  /** Records the step the stepper moved to (Material's `selectionChange`). */
  protected stepOpened(event: StepperSelectionEvent): void {
    this.openedSteps.update((opened) => new Set(opened).add(event.selectedIndex));
  }

  /** The words under the case-days field. */
  protected dateError(): string | null {
    return caseDaysError(this.windowForm);
  }

  /** Whether the case-days field shows its problem. */
  protected dateErrorShown(): boolean {
    return caseDaysErrorShown(this.windowForm);
  }

  protected retryChecks(): void {
    this.runChecks(this.checkKey(), true);
  }

  protected remove(unitId: number): void {
    this.draft.remove(unitId);
    this.conflicts.update((list) => list?.filter((c) => c.unitId !== unitId) ?? null);
  }

  protected addCompatible(item: AvailabilityItem): void {
    const outcome = this.draft.add(draftUnitOf(item));
    const problem = addOutcomeMessage(outcome, this.draft.lender()?.name ?? null);
    if (problem) this.notifier.error(problem);
  }

  /** Moves the case days (from a unit's earliest window); the checks run again. */
  protected useWindow(window: { useFrom: IsoDate; useTo: IsoDate }): void {
    this.windowForm.patchValue({
      useFrom: fromIsoDate(window.useFrom),
      useTo: fromIsoDate(window.useTo),
    });
    this.windowForm.markAllAsTouched();
    this.conflicts.set(null);
    this.conflictMessage.set(null);
  }

  /** Moves the case days to a unit's earliest fitting window. */
  protected useEarliest(item: AvailabilityItem): void {
    if (item.earliestUseFrom && item.earliestUseTo) {
      this.useWindow({ useFrom: item.earliestUseFrom, useTo: item.earliestUseTo });
    }
  }

  /** Puts a stand-in where a refused unit was. */
  protected swapIn(alternative: AlternativeItem): void {
    this.draft.replace(alternative.forUnitId, draftUnitOf(alternative));
    this.conflicts.update((list) => {
      const left = list?.filter((c) => c.unitId !== alternative.forUnitId) ?? [];
      return left.length ? left : null;
    });
    if (!this.conflicts()) this.conflictMessage.set(null);
  }

  /** Sends the request; on success opens the new loan. */
  protected send(): void {
    const w = this.window();
    if (!w || !this.allFit() || this.sending() || this.note.invalid) return;
    const body: CreateLoanRequest = {
      siteId: w.siteId,
      unitIds: this.draft.units().map((u) => u.unitId),
      useFrom: w.useFrom,
      useTo: w.useTo,
      ...(this.note.value.trim() ? { note: this.note.value.trim() } : {}),
    };
    this.sending.set(true);
    this.submitError.set(null);
    this.conflicts.set(null);
    this.conflictMessage.set(null);
    this.loans.request(body).subscribe({
      next: (loan) => {
        this.sending.set(false);
        this.draft.clear();
        this.notifier.success(`Request ${loan.reference} sent to ${loan.lenderName}.`);
        void this.router.navigate(['/loans', loan.id]);
      },
      error: (error: unknown) => {
        this.sending.set(false);
        this.handleRefusal(error, w);
      },
    });
  }

  private handleRefusal(error: unknown, w: RequestWindow): void {
    const details = error instanceof ApiError ? error.details : null;
    if (error instanceof ApiError && error.status === 409 && isUnavailableDetails(details)) {
      const names = new Map(
        this.draft.units().map((u) => [u.unitId, `${u.modelName} ${u.serialNumber}`]),
      );
      const length = windowLength(w.useFrom, w.useTo);
      this.conflictMessage.set(error.message);
      this.conflicts.set(
        details.conflicts.map((c) => ({
          unitId: c.unitId,
          name: names.get(c.unitId) ?? `Unit ${c.unitId}`,
          reason: c.reason,
          earliest: c.earliestUseFrom
            ? { useFrom: c.earliestUseFrom, useTo: addDays(c.earliestUseFrom, length - 1) }
            : null,
          // Only units of the same model can take the refused unit's place; the server's other
          // suggestions (compatible models) are equipment compatible with it, not a substitute.
          alternatives: details.alternatives.filter(
            (a) => a.forUnitId === c.unitId && a.relation === 'same_model',
          ),
        })),
      );
      // The server knows more than our check did: look again so the units show the truth.
      this.runChecks(this.checkKey(), true);
      return;
    }
    if (error instanceof ApiError && Object.keys(error.fieldErrors).length) {
      let firstStep = false;
      for (const [field, message] of Object.entries(error.fieldErrors)) {
        const control = field === 'note' ? this.note : this.windowForm.get(field);
        if (!control) continue;
        control.setErrors({ ...control.errors, server: message });
        control.markAsTouched();
        if (field !== 'note') firstStep = true;
      }
      this.submitError.set(error.message);
      if (firstStep) {
        const stepper = this.stepper();
        if (stepper) stepper.selectedIndex = 0;
      }
      return;
    }
    this.submitError.set(messageOf(error));
  }

  private prefillWindow(): void {
    const campuses = this.campuses();
    const d = this.draft.value();
    const wantedSite = Number(this.siteId()) || d.siteId;
    const siteId = campuses.some((c) => c.id === wantedSite)
      ? wantedSite
      : (campuses[0]?.id ?? null);
    const from = isIsoDate(this.from()) ? this.from()! : d.useFrom;
    const to = isIsoDate(this.to()) ? this.to()! : d.useTo;
    this.windowForm.patchValue({
      siteId,
      ...(from && to ? { useFrom: fromIsoDate(from), useTo: fromIsoDate(to) } : {}),
    });
    // Dates that came with the selection are checked at once, so a stale day shows its message.
    if (from && to) this.windowForm.markAllAsTouched();
  }

  private addUnitsFromAddress(ids: number[]): void {
    const missing = ids.filter((id) => !this.draft.has(id));
    if (!missing.length) return;
    const w = this.draft.value();
    forkJoin(missing.map((id) => this.catalog.unit(id).pipe(catchError(() => of(null)))))
      .pipe(
        switchMap((units) => {
          const found = units.filter((u) => u !== null);
          const siteId = Number(this.siteId()) || w.siteId || this.campuses()[0]?.id;
          const from = isIsoDate(this.from()) ? this.from()! : w.useFrom;
          const to = isIsoDate(this.to()) ? this.to()! : w.useTo;
          if (!found.length || !siteId || !from || !to)
            return of({ found, items: [] as AvailabilityItem[] });
          const models = [...new Set(found.map((u) => u.modelId))];
          return forkJoin(
            models.map((modelId) =>
              this.catalog.availability({ modelId, siteId, useFrom: from, useTo: to }).pipe(
                map((r) => r.items),
                catchError(() => of([] as AvailabilityItem[])),
              ),
            ),
          ).pipe(map((lists) => ({ found, items: lists.flat() })));
        }),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe(({ items }) => {
        for (const id of missing) {
          const item = items.find((i) => i.unitId === id);
          if (!item) continue;
          const problem = addOutcomeMessage(
            this.draft.add(draftUnitOf(item)),
            this.draft.lender()?.name ?? null,
          );
          if (problem) this.notifier.error(problem);
        }
        if (missing.some((id) => !this.draft.has(id))) {
          this.notifier.error(
            'Some units from the link can’t be lent right now and were left out.',
          );
        }
      });
  }

  private runChecks(key: string | null, force = false): void {
    if (!force && key !== null && this.checks()?.key === key && !this.checkError()) return;
    this.checkRun?.unsubscribe();
    this.checkError.set(null);
    const w = this.window();
    const units = this.draft.units();
    if (key === null || !w || !units.length) {
      this.checking.set(false);
      return;
    }
    this.checking.set(true);
    const models = [...new Set(units.map((u) => u.modelId))];
    const window = { siteId: w.siteId, useFrom: w.useFrom, useTo: w.useTo };
    this.checkRun = forkJoin({
      chosen: forkJoin(
        models.map((modelId) =>
          this.catalog.availability({ ...window, modelId }).pipe(map((r) => r.items)),
        ),
      ),
      compatible: forkJoin(
        models.map((compatibleWith) =>
          this.catalog.availability({ ...window, compatibleWith }).pipe(
            map((r) => r.items),
            // Suggestions are a nice-to-have: their failure must not block the request.
            catchError(() => of([] as AvailabilityItem[])),
          ),
        ),
      ),
    }).subscribe({
      next: ({ chosen, compatible }) => {
        const items = new Map(chosen.flat().map((i) => [i.unitId, i]));
        const seen = new Set<number>();
        const lender = this.draft.lender()?.id;
        const suggestions = compatible
          .flat()
          .filter(
            (i) => i.feasible && i.lenderId === lender && !seen.has(i.unitId) && seen.add(i.unitId),
          );
        this.checks.set({ key, items, compatible: suggestions });
        this.checking.set(false);
      },
      error: (error: unknown) => {
        this.checkError.set(messageOf(error));
        this.checking.set(false);
      },
    });
  }
}
