import type { Milestones } from '@evalon/contracts';

import { assertHttpUrl } from './escape';

/**
 * The cautions in their short form, shown in every message footer and invite description
 * (docs/design/product.md, "Cautions the product shows").
 */
export const CAUTIONS_SHORT =
  'Evalon schedules and documents; it does not certify. Computed dates and deposits are ' +
  'estimates until the lender confirms; local rules, contracts and licensed practice prevail.';

/** The clinical cautions, shown where clinicians read (the confirmation). */
export const CLINICAL_CAUTIONS = [
  'Loaned devices are used only by trained clinicians, following the manufacturer’s ' +
    'instructions for use.',
  'Treat the unit as contaminated on arrival; reprocess it according to its instructions for ' +
    'use and your sterile-processing policy, and decontaminate it before it ships back.',
  'Case records are de-identified: leave out patient names, record numbers and dates of birth.',
] as const;

/** Milestones in plain words (our own wording), as every message and invite shows them. */
export const MILESTONE_LABELS: Readonly<Record<keyof Milestones, string>> = {
  shipBy: 'Ship by',
  deliverBy: 'Arrives by',
  useFrom: 'First case day',
  useTo: 'Last case day',
  returnShipBy: 'Ships back by',
  backAtDepot: 'Back at depot',
  readyAgain: 'Ready again',
};

/** Milestones that are calendar days at the hospital site, in loan order. */
export const SITE_MILESTONES = ['deliverBy', 'useFrom', 'useTo', 'returnShipBy'] as const;

/** Milestones that are calendar days at the lender's depot, in loan order. */
export const DEPOT_MILESTONES = ['shipBy', 'backAtDepot', 'readyAgain'] as const;

/** One unit on one line: `Model, serial S-1 (from Depot)`. */
export function unitLine(unit: {
  modelName: string;
  serialNumber: string;
  depotName: string;
}): string {
  return `${unit.modelName}, serial ${unit.serialNumber} (from ${unit.depotName})`;
}

/**
 * The loan's page in the web app.
 *
 * @param publicUrl Public base URL, e.g. `https://evalon.example` (a trailing slash is fine).
 * @param loanId The loan's id.
 * @throws TypeError when `publicUrl` is not an absolute http(s) URL.
 */
export function loanUrl(publicUrl: string, loanId: number): string {
  const base = assertHttpUrl(publicUrl, 'publicUrl').replace(/\/+$/, '');
  return `${base}/loans/${encodeURIComponent(String(loanId))}`;
}
