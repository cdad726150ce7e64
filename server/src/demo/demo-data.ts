import type { OrganisationKind, Role } from '@evalon/contracts';

/**
 * The invented demo scenario. Every organisation, person, address and e-mail domain here is
 * made up (`.example` domains are reserved for examples by RFC 2606); coordinates are
 * plausible points in the named regions, not any real facility.
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
    name: 'Harbourview Health',
    kind: 'hospital',
    country: 'US',
    sites: [
      {
        kind: 'campus',
        name: 'Harbourview Medical Center',
        addressLine: '1200 Tidewater Avenue, Receiving Dock B',
        city: 'Boston',
        postalCode: '02118',
        region: 'MA',
        country: 'US',
        latitude: 42.3371,
        longitude: -71.0712,
        timeZone: 'America/New_York',
        receivingHours: 'Mon–Fri 06:30–15:00',
        cutoffTime: null,
      },
      {
        kind: 'campus',
        name: 'Harbourview Lakeshore Hospital',
        addressLine: '455 Prairie Crest Drive, Loading Bay 2',
        city: 'Chicago',
        postalCode: '60616',
        region: 'IL',
        country: 'US',
        latitude: 41.8562,
        longitude: -87.6198,
        timeZone: 'America/Chicago',
        receivingHours: 'Mon–Fri 07:00–16:00',
        cutoffTime: null,
      },
    ],
    people: [
      {
        email: 'buyer@harbourview.example',
        name: 'Dana Whitcombe',
        role: 'buyer',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'clinician@harbourview.example',
        name: 'Rafael Oyelaran',
        role: 'clinician',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'or.nurse@harbourview.example',
        name: 'Jonah Feldmark',
        role: 'clinician',
        timeZone: 'America/Chicago',
        state: 'pending',
      },
      {
        email: 'former.clinician@harbourview.example',
        name: 'Alma Kristoffersen',
        role: 'clinician',
        timeZone: 'America/New_York',
        state: 'deactivated',
      },
    ],
  },
  {
    name: 'Klinikum Rheinau',
    kind: 'hospital',
    country: 'DE',
    sites: [
      {
        kind: 'campus',
        name: 'Klinikum Rheinau, Hauptcampus',
        addressLine: 'Uferweg 21, Warenannahme Nord',
        city: 'Karlsruhe',
        postalCode: '76189',
        region: null,
        country: 'DE',
        latitude: 49.0123,
        longitude: 8.3334,
        timeZone: 'Europe/Berlin',
        receivingHours: 'Mo–Fr 07:00–14:30',
        cutoffTime: null,
      },
    ],
    people: [
      {
        email: 'buyer@rheinau.example',
        name: 'Friederike Albrecht-Sommer',
        role: 'buyer',
        timeZone: 'Europe/Berlin',
        state: 'active',
      },
      {
        email: 'clinician@rheinau.example',
        name: 'Jonas Weidenfeller',
        role: 'clinician',
        timeZone: 'Europe/Berlin',
        state: 'active',
      },
    ],
  },
  {
    name: 'Kestrel Surgical',
    kind: 'lender',
    country: 'US',
    sites: [
      {
        kind: 'depot',
        name: 'Kestrel East Depot',
        addressLine: '88 Meadowlark Industrial Parkway',
        city: 'Edison',
        postalCode: '08837',
        region: 'NJ',
        country: 'US',
        latitude: 40.5186,
        longitude: -74.3479,
        timeZone: 'America/New_York',
        receivingHours: 'Mon–Fri 08:00–17:00',
        cutoffTime: '15:00',
      },
      {
        kind: 'depot',
        name: 'Kestrel West Depot',
        addressLine: '2710 Sagebrush Commerce Way',
        city: 'Reno',
        postalCode: '89502',
        region: 'NV',
        country: 'US',
        latitude: 39.4977,
        longitude: -119.7668,
        timeZone: 'America/Los_Angeles',
        receivingHours: 'Mon–Fri 07:00–16:00',
        cutoffTime: '14:00',
      },
      {
        kind: 'depot',
        name: 'Kestrel Europe Depot',
        addressLine: 'Am Frachtzentrum 7',
        city: 'Mörfelden-Walldorf',
        postalCode: '64546',
        region: null,
        country: 'DE',
        latitude: 50.0014,
        longitude: 8.5702,
        timeZone: 'Europe/Berlin',
        receivingHours: 'Mo–Fr 07:30–16:30',
        cutoffTime: '15:00',
      },
    ],
    people: [
      {
        email: 'fleet@kestrel.example',
        name: 'Marcus Tennant-Hale',
        role: 'fleet_manager',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'coordinator@kestrel.example',
        name: 'Priya Ramaswamy-Cole',
        role: 'coordinator',
        timeZone: 'America/New_York',
        state: 'active',
      },
      {
        email: 'depot.west@kestrel.example',
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
