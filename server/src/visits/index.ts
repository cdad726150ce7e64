/**
 * The visits component's front door: proctoring visits, their offers (one proctor at a time),
 * answers, the offer-deadline job, case records and sign-offs. Other components import from
 * here only.
 */
import type { DataSource } from 'typeorm';
import type { AppComponent } from '../app-services';
import { visitNotifierFromConfig } from '../notifications';
import { visitRoutes } from './api/routes';
import { startOfferDeadlineJob, type OfferDeadlineJob } from './domain/offers';
import type { Logger } from '../logger';
import { defaultVisitSettings, type VisitDeps, type VisitSettings } from './domain/deps';
import { noVisitNotifications, type NotifyVisitEvent } from './domain/notifications';
import {
  VisitCaseEntity,
  VisitEntity,
  VisitEventEntity,
  VisitOfferEntity,
  VisitSignOffEntity,
} from './data-access/entities';

export { visitRoutes } from './api/routes';
export { defaultVisitSettings, type VisitDeps, type VisitSettings } from './domain/deps';
export {
  noVisitNotifications,
  visitNotificationEvents,
  type NotifyVisitEvent,
  type VisitEventNotice,
  type VisitNotificationEvent,
} from './domain/notifications';
export { runOfferDeadlines, startOfferDeadlineJob, type OfferDeadlineJob } from './domain/offers';
export { signOffCaution } from './domain/pdf';

/** The component's tables. */
export const visitEntities = [
  VisitEntity,
  VisitOfferEntity,
  VisitEventEntity,
  VisitCaseEntity,
  VisitSignOffEntity,
];

/** Settings from the environment: `EVALON_VISIT_OFFER_HOURS`, `EVALON_VISIT_TRAVEL_DAY_KM`. */
export function visitSettingsFromEnv(env: NodeJS.ProcessEnv = process.env): VisitSettings {
  const number = (name: string, fallback: number) => {
    const raw = env[name]?.trim();
    if (!raw) return fallback;
    const value = Number(raw);
    if (!Number.isFinite(value) || value <= 0) throw new Error(`${name} must be a number above 0`);
    return value;
  };
  return {
    ...defaultVisitSettings,
    offerHours: number('EVALON_VISIT_OFFER_HOURS', defaultVisitSettings.offerHours),
    travelDayThresholdKm: number(
      'EVALON_VISIT_TRAVEL_DAY_KM',
      defaultVisitSettings.travelDayThresholdKm,
    ),
  };
}

/** The visits component's dependencies. */
export function createVisitDeps(input: {
  dataSource: DataSource;
  logger: Logger;
  now?: () => Date;
  notifyVisitEvent?: NotifyVisitEvent;
  settings?: Partial<VisitSettings>;
}): VisitDeps {
  return {
    dataSource: input.dataSource,
    logger: input.logger,
    now: input.now ?? (() => new Date()),
    notifyVisitEvent: input.notifyVisitEvent ?? noVisitNotifications,
    settings: { ...visitSettingsFromEnv(), ...input.settings },
  };
}
export { acceptOffer, cancelVisit, declineOffer, reopenVisit, requestVisit } from './domain/offers';
export { completeVisit, recordCase, signOffTrainee } from './domain/records';

/** Proctoring visits, `/api/visits`, and the offer-deadline job. */
export const visitsComponent: AppComponent = {
  name: 'visits',
  entities: visitEntities,
  routers: (ctx) => [
    visitRoutes(
      createVisitDeps({
        dataSource: ctx.dataSource,
        logger: ctx.logger,
        now: ctx.now,
        notifyVisitEvent: ctx.services.notifyVisitEvent,
      }),
      ctx.catalogue,
    ),
  ],
  jobs: (ctx) => {
    // Lapsed offers move to the next proctor; rows are claimed with SKIP LOCKED, so any number
    // of processes may run it.
    let job: OfferDeadlineJob | null = null;
    return [
      {
        name: 'visit offer deadline job',
        details: {},
        start: () => {
          job = startOfferDeadlineJob(
            createVisitDeps({
              dataSource: ctx.dataSource,
              logger: ctx.logger,
              notifyVisitEvent: visitNotifierFromConfig(ctx.config),
            }),
          );
        },
        stop: async () => {
          await job?.stop();
        },
      },
    ];
  },
};
