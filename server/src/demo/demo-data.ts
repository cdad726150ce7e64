import type { OrganisationKind, Role } from '@evalon/contracts';

/**
 * The invented demo scenario. Every organisation, person, address and e-mail domain here is
 * made up (`.example` domains are reserved for examples by RFC 2606). Street names are invented
 * (they carry the invented organisations' names). The coordinates were chosen, from memory of
 * the regions' maps, on open land (marsh, forest, scrub) with no hospital, clinic or any real
 * company's depot nearby, so a map pin never points at a real facility; distances between the
 * sites keep the same transit bands as before (checked with geolib when they were chosen).
 */

/** Password of every demo account. */
export const demoPassword = 'evalon-demo';

export interface DemoSite {
  kind: 'campus' | 'depot';
  name: string;
  addressLine: string;
  city: string;
  postalCode: string;
  region: string | null;
  country: string;
  latitude: number;
  longitude: number;
  timeZone: string;
  receivingHours: string | null;
  cutoffTime: string | null;
}

export interface DemoPerson {
  email: string;
  name: string;
  role: Role;
  timeZone: string;
  /** `active` signs in; `pending` was invited and has not accepted; `deactivated` cannot sign in. */
  state: 'active' | 'pending' | 'deactivated';
}

export interface DemoOrganisation {
  name: string;
  kind: OrganisationKind;
  country: string;
  sites: DemoSite[];
  people: DemoPerson[];
}

export const demoOrganisations: DemoOrganisation[] = [
  {
    name: 'Evalon Marketplace',
    kind: 'platform',
    country: 'US',
    sites: [],
    people: [
      {
        email: 'admin@evalon.example',
        name: 'Noor Lindqvist',
        role: 'admin',
        timeZone: 'America/New_York',
        state: 'active',
      },
    ],
  },
  {
    name: 'Velmora Health',
    kind: 'hospital',
    country: 'US',
    sites: [
      {
        kind: 'campus',
        name: 'Velmora East Campus',
        addressLine: '1 Velmora Way, Receiving Dock B',
        city: 'Boston',
        postalCode: '02128',
        region: 'MA',
        country: 'US',
        latitude: 42.3893,
        longitude: -70.9947,
        timeZone: 'America/New_York',
        receivingHours: 'Mon–Fri 06:30–15:00',
        cutoffTime: null,
      },
      {
        kind: 'campus',
        name: 'Velmora Lakefront Campus',
        addressLine: '200 Velmora Lakefront Drive, Loading Bay 2',
        city: 'Chicago',
        postalCode: '60633',
        region: 'IL',
        country: 'US',
        latitude: 41.6873,
        longitude: -87.5775,
        timeZone: 'America/Chicago',
        receivingHours: 'Mon–Fri 07:00–16:00',
        cutoffTime: null,
      },
    ],
    people: [
      {
        email: 'buyer@velmora.example',
        name: 'Dana Whitcombe',
        role: 'buyer',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'clinician@velmora.example',
        name: 'Rafael Oyelaran',
        role: 'clinician',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'or.nurse@velmora.example',
        name: 'Jonah Feldmark',
        role: 'clinician',
        timeZone: 'America/Chicago',
        state: 'pending',
      },
      {
        email: 'former.clinician@velmora.example',
        name: 'Alma Kristoffersen',
        role: 'clinician',
        timeZone: 'America/New_York',
        state: 'deactivated',
      },
    ],
  },
  {
    name: 'Klinikum Orlenbach',
    kind: 'hospital',
    country: 'DE',
    sites: [
      {
        kind: 'campus',
        name: 'Orlenbach Hauptstandort',
        addressLine: 'Orlenbach-Allee 1, Warenannahme Nord',
        city: 'Karlsruhe',
        postalCode: '76149',
        region: 'BW',
        country: 'DE',
        latitude: 49.056,
        longitude: 8.42,
        timeZone: 'Europe/Berlin',
        receivingHours: 'Mo–Fr 07:00–14:30',
        cutoffTime: null,
      },
    ],
    people: [
      {
        email: 'buyer@orlenbach.example',
        name: 'Friederike Albrecht-Sommer',
        role: 'buyer',
        timeZone: 'Europe/Berlin',
        state: 'active',
      },
      {
        email: 'clinician@orlenbach.example',
        name: 'Jonas Weidenfeller',
        role: 'clinician',
        timeZone: 'Europe/Berlin',
        state: 'active',
      },
    ],
  },
  {
    name: 'Quorvel Surgical',
    kind: 'lender',
    country: 'US',
    sites: [
      {
        kind: 'depot',
        name: 'Quorvel East Depot',
        addressLine: '5 Quorvel Parkway',
        city: 'Edison',
        postalCode: '08820',
        region: 'NJ',
        country: 'US',
        latitude: 40.555,
        longitude: -74.385,
        timeZone: 'America/New_York',
        receivingHours: 'Mon–Fri 08:00–17:00',
        cutoffTime: '15:00',
      },
      {
        kind: 'depot',
        name: 'Quorvel West Depot',
        addressLine: '2 Quorvel Ridge Road',
        city: 'Reno',
        postalCode: '89502',
        region: 'NV',
        country: 'US',
        latitude: 39.486,
        longitude: -119.665,
        timeZone: 'America/Los_Angeles',
        receivingHours: 'Mon–Fri 07:00–16:00',
        cutoffTime: '14:00',
      },
      {
        kind: 'depot',
        name: 'Quorvel Europe Depot',
        addressLine: 'Quorvel-Ring 7',
        city: 'Mörfelden-Walldorf',
        postalCode: '64546',
        region: 'HE',
        country: 'DE',
        latitude: 49.975,
        longitude: 8.548,
        timeZone: 'Europe/Berlin',
        receivingHours: 'Mo–Fr 07:30–16:30',
        cutoffTime: '15:00',
      },
    ],
    people: [
      {
        email: 'fleet@quorvel.example',
        name: 'Marcus Tennant-Hale',
        role: 'fleet_manager',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'coordinator@quorvel.example',
        name: 'Priya Ramaswamy-Cole',
        role: 'coordinator',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'depot.west@quorvel.example',
        name: 'Tomasz Brennan-Ruiz',
        role: 'coordinator',
        timeZone: 'America/Los_Angeles',
        state: 'active',
      },
    ],
  },
  {
    name: 'Osterby Proctoring Practice',
    kind: 'proctor_practice',
    country: 'US',
    sites: [],
    people: [
      {
        email: 'proctor@proctors.example',
        name: 'Helena Osterby',
        role: 'proctor',
        timeZone: 'America/Chicago',
        state: 'active',
      },
    ],
  },
];
