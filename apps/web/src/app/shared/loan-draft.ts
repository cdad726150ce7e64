import { Injectable, computed, signal } from '@angular/core';
import type { AvailabilityItem, ModelCategory, Money } from '@evalon/contracts';
import type { IsoDate } from './iso-date';
import { maxUnitsPerLoan } from '@evalon/contracts/values';

/** A unit chosen for a loan request, with what the request screens show about it. */
export interface DraftUnit {
  readonly unitId: number;
  readonly modelId: number;
  readonly modelName: string;
  readonly category: ModelCategory;
  readonly serialNumber: string;
  readonly lenderId: number;
  readonly lenderName: string;
  readonly depotName: string;
  /** The unit's deposit estimate when it was chosen. */
  readonly deposit: Money;
}

/** The request being put together: campus, case days and units. */
export interface LoanDraftState {
  readonly siteId: number | null;
  readonly useFrom: IsoDate | null;
  readonly useTo: IsoDate | null;
  readonly units: readonly DraftUnit[];
}

/** What happened when a unit was offered to the draft. */
export type AddOutcome = 'added' | 'already_chosen' | 'other_lender' | 'full';

/** Session storage key: the draft survives a reload but not the browser tab. */
export const LOAN_DRAFT_KEY = 'evalon.loanDraft';

const empty: LoanDraftState = { siteId: null, useFrom: null, useTo: null, units: [] };

function read(): LoanDraftState {
  try {
    const raw = globalThis.sessionStorage?.getItem(LOAN_DRAFT_KEY);
    if (!raw) return empty;
    const parsed = JSON.parse(raw) as Partial<LoanDraftState>;
    return {
      siteId: typeof parsed.siteId === 'number' ? parsed.siteId : null,
      useFrom: typeof parsed.useFrom === 'string' ? parsed.useFrom : null,
      useTo: typeof parsed.useTo === 'string' ? parsed.useTo : null,
      units: Array.isArray(parsed.units) ? parsed.units : [],
    };
  } catch {
    // Unreadable or blocked storage: start with an empty draft.
    return empty;
  }
}

function write(state: LoanDraftState): void {
  try {
    globalThis.sessionStorage?.setItem(LOAN_DRAFT_KEY, JSON.stringify(state));
  } catch {
    // Not keeping the draft across reloads is harmless.
  }
}

/** Turns a search result into a draft unit. */
export function draftUnitOf(item: AvailabilityItem): DraftUnit {
  return {
    unitId: item.unitId,
    modelId: item.modelId,
    modelName: item.modelName,
    category: item.category,
    serialNumber: item.serialNumber,
    lenderId: item.lenderId,
    lenderName: item.lenderName,
    depotName: item.depotName,
    deposit: item.deposit,
  };
}

/**
 * The units a buyer picks in Find equipment ("Add to request") and the request stepper reads.
 * A loan is one lender's units, all or nothing, so units of a second lender are refused.
 */
@Injectable({ providedIn: 'root' })
export class LoanDraft {
  private readonly state = signal<LoanDraftState>(read());

  /** The whole draft. */
  readonly value = this.state.asReadonly();
  /** Chosen units, in the order they were added. */
  readonly units = computed(() => this.state().units);
  /** Ids of the chosen units. */
  readonly unitIds = computed(() => new Set(this.state().units.map((u) => u.unitId)));
  /** Number of chosen units. */
  readonly count = computed(() => this.state().units.length);
  /** The lender of the chosen units, once there is one. */
  readonly lender = computed(() => {
    const first = this.state().units[0];
    return first ? { id: first.lenderId, name: first.lenderName } : null;
  });

  /** Whether the unit is in the draft. */
  has(unitId: number): boolean {
    return this.unitIds().has(unitId);
  }

  /** Adds a unit unless it is there already, belongs to another lender or the loan is full. */
  add(unit: DraftUnit): AddOutcome {
    const current = this.state();
    if (current.units.some((u) => u.unitId === unit.unitId)) return 'already_chosen';
    const lender = current.units[0]?.lenderId;
    if (lender !== undefined && lender !== unit.lenderId) return 'other_lender';
    if (current.units.length >= maxUnitsPerLoan) return 'full';
    this.update({ ...current, units: [...current.units, unit] });
    return 'added';
  }

  /** Takes a unit out. */
  remove(unitId: number): void {
    const current = this.state();
    this.update({ ...current, units: current.units.filter((u) => u.unitId !== unitId) });
  }

  /** Puts `replacement` where `unitId` was (an alternative for a unit that does not fit). */
  replace(unitId: number, replacement: DraftUnit): void {
    const current = this.state();
    const units = current.units
      .map((u) => (u.unitId === unitId ? replacement : u))
      .filter((u, i, all) => all.findIndex((o) => o.unitId === u.unitId) === i);
    this.update({ ...current, units });
  }

  /** Records the campus and case days the units were looked at for. */
  setWindow(siteId: number | null, useFrom: IsoDate | null, useTo: IsoDate | null): void {
    this.update({ ...this.state(), siteId, useFrom, useTo });
  }

  /** Forgets everything (after a request was sent, or on "Clear"). */
  clear(): void {
    this.update(empty);
  }

  private update(next: LoanDraftState): void {
    this.state.set(next);
    write(next);
  }
}

/** Words for an {@link AddOutcome} that was not a plain success. */
export function addOutcomeMessage(outcome: AddOutcome, lenderName: string | null): string | null {
  switch (outcome) {
    case 'other_lender':
      return `One request covers one lender’s equipment. Send the ${lenderName ?? 'other'} units first, or clear the request to start again.`;
    case 'full':
      return `A request can hold at most ${maxUnitsPerLoan} units.`;
    default:
      return null;
  }
}
