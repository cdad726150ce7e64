import type { Role } from '@evalon/contracts';
import { memberManagingRoles } from '@evalon/contracts/values';

/** A page of the product that appears in the side navigation for some roles. */
export interface Destination {
  /** Router path below the shell, without a leading slash. */
  readonly path: string;
  /** Navigation label and page title. */
  readonly label: string;
  /** Material Symbols ligature. */
  readonly icon: string;
  /** Roles (in the active organisation) that see and may open the page. */
  readonly roles: readonly Role[];
  /** One or two sentences on what the page lets people do. */
  readonly summary: string;
}

/** One link in the side navigation. */
export interface NavEntry {
  readonly label: string;
  readonly icon: string;
  readonly link: string;
  /** Whether the link is active only on its exact URL (true for Home). */
  readonly exact: boolean;
}

/**
 * Pages that are planned but not built yet. Their routes show the "coming soon" page, so the
 * navigation is already the one people will use; each entry is replaced by its real feature
 * route as it lands.
 */
export const plannedDestinations: readonly Destination[] = [
  {
    path: 'schedule',
    label: 'Schedule',
    icon: 'event',
    roles: ['clinician'],
    summary:
      'See when the loaned kit reaches your campus, when cases can start and when the proctor comes.',
  },
  {
    path: 'case-log',
    label: 'Case log',
    icon: 'clinical_notes',
    roles: ['clinician'],
    summary:
      'Record each evaluation case, de-identified, so the evaluation report builds itself as you go.',
  },
  {
    path: 'organisations',
    label: 'Organisations',
    icon: 'apartment',
    roles: ['admin'],
    summary: 'Look after the hospitals, lenders and proctor practices on the marketplace.',
  },
  {
    path: 'audit',
    label: 'Audit',
    icon: 'history',
    roles: ['admin'],
    summary: 'Look back at who did what, and when, across the marketplace.',
  },
];

/**
 * Pages that are built: each has a lazy feature route in app.routes.ts, guarded by the same
 * roles as its navigation entry.
 */
export const builtDestinations: readonly Destination[] = [
  {
    path: 'visits',
    label: 'Proctoring',
    icon: 'supervisor_account',
    // Clinicians ask for proctors too (they know the case days); both follow the visits.
    roles: ['buyer', 'clinician'],
    summary:
      'Ask for an experienced proctor for your surgeons’ first cases, see who was asked and who accepted, and the cases they signed off.',
  },
  {
    path: 'training',
    label: 'My training',
    icon: 'school',
    roles: ['clinician'],
    summary:
      'See your cases on proctored visits, your count towards your hospital’s sign-off threshold and your sign-off records.',
  },
  {
    path: 'visit-settings',
    label: 'Visit settings',
    icon: 'tune',
    // Lenders set the minimum supervised cases per model; hospitals the sign-off threshold.
    roles: ['fleet_manager', 'buyer'],
    summary:
      'Set the supervised cases a proctor needs on each of your models, or how many cases your trainees perform under supervision before a sign-off.',
  },
  {
    path: 'proctor',
    label: 'Visit offers',
    icon: 'mark_email_unread',
    roles: ['proctor'],
    summary:
      'Accept or decline requests to supervise first cases, with the dates, the hospital and the platform in one view.',
  },
  {
    path: 'proctor/credentials',
    label: 'Credentials',
    icon: 'badge',
    roles: ['proctor'],
    summary:
      'Keep your licences, credentials and availability current so hospitals can ask you for the right visits.',
  },
  {
    path: 'proctor/calendar',
    label: 'Calendar',
    icon: 'calendar_month',
    roles: ['proctor'],
    summary:
      'See your accepted visits month by month, with their travel days and your availability.',
  },
  {
    path: 'shipments',
    label: 'Shipments',
    icon: 'local_shipping',
    // Coordinators work the board; fleet managers follow it read-only (the server decides).
    roles: ['coordinator', 'fleet_manager'],
    summary:
      'Pack, ship, track and receive back every unit, with packing checklists, barcode scans and return inspections.',
  },
  {
    path: 'equipment',
    label: 'Find equipment',
    icon: 'search',
    roles: ['buyer'],
    summary:
      'Search lenders’ surgical platforms by category, compatible accessories, location and your case dates, and see each unit’s earliest dates and deposit before you ask for a loan.',
  },
  {
    path: 'loans',
    label: 'Loans',
    icon: 'inventory_2',
    // Clinicians follow their hospital's loans read-only; buyers request and cancel.
    roles: ['buyer', 'clinician'],
    summary:
      'Follow every evaluation loan from request to return: dates, deposit, purchase order, signed loan agreement, receipt and the evaluation report.',
  },
  {
    path: 'catalog',
    label: 'Catalog',
    icon: 'category',
    roles: ['fleet_manager'],
    summary:
      'List your models with their compatibility, packing lists, deposit rules and lead times.',
  },
  {
    path: 'approvals',
    label: 'Approvals',
    icon: 'fact_check',
    roles: ['fleet_manager'],
    summary:
      'Approve or decline hospitals’ loan requests with the dates and deposit in front of you.',
  },
  {
    path: 'credit-agreements',
    label: 'Credit agreements',
    icon: 'handshake',
    roles: ['fleet_manager'],
    summary:
      'Choose which hospitals may confirm your loans with a purchase order instead of a card deposit.',
  },
  {
    path: 'outbox',
    label: 'E-mail outbox',
    icon: 'outgoing_mail',
    roles: ['admin'],
    summary: 'See e-mails Evalon could not deliver and send them again.',
  },
  {
    path: 'units',
    label: 'Units',
    icon: 'devices',
    // Coordinators see the fleet read-only; fleet managers change it.
    roles: ['fleet_manager', 'coordinator'],
    summary: 'See every serial-numbered unit, its base depot, its holds and where it is right now.',
  },
];

/**
 * Order of the side navigation by path, so a page keeps its place when it moves from planned
 * to built. Paths not listed here come last, in the order they are declared.
 */
const navigationOrder: readonly string[] = [
  'equipment',
  'loans',
  'visits',
  'training',
  'schedule',
  'case-log',
  'proctor',
  'proctor/credentials',
  'proctor/calendar',
  'shipments',
  'catalog',
  'approvals',
  'credit-agreements',
  'units',
  'visit-settings',
  'organisations',
  'audit',
  'outbox',
];

/** Every destination, built or planned, in navigation order. */
function destinationsInOrder(): Destination[] {
  const rank = (d: Destination) => {
    const index = navigationOrder.indexOf(d.path);
    return index === -1 ? navigationOrder.length : index;
  };
  return [...builtDestinations, ...plannedDestinations].sort((a, b) => rank(a) - rank(b));
}

/** Whether any of `held` is one of `wanted`. */
export function hasAnyRole(held: readonly Role[], wanted: readonly Role[]): boolean {
  return held.some((role) => wanted.includes(role));
}

/**
 * The side navigation for someone holding `roles` in the organisation `organisationId`:
 * Home first, then each page their roles open (once, in a fixed order), then Members for the
 * roles that manage people.
 */
export function navigationFor(roles: readonly Role[], organisationId: number | null): NavEntry[] {
  const entries: NavEntry[] = [{ label: 'Home', icon: 'home', link: '/', exact: true }];
  const all = destinationsInOrder();
  for (const destination of all) {
    if (hasAnyRole(roles, destination.roles)) {
      entries.push({
        label: destination.label,
        icon: destination.icon,
        link: `/${destination.path}`,
        // A page with pages of its own in the navigation (Visit offers under /proctor) is
        // active only on its own address, so one link is highlighted at a time.
        exact: all.some((other) => other.path.startsWith(`${destination.path}/`)),
      });
    }
  }
  if (organisationId !== null && hasAnyRole(roles, memberManagingRoles)) {
    entries.push({
      label: 'Members',
      icon: 'group',
      link: `/organisations/${organisationId}/members`,
      exact: false,
    });
  }
  return entries;
}
