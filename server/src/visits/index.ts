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
import type { Config } from '../config';
import type { Logger } from '../logger';
import { defaultVisitSettings, type VisitDeps, type VisitSettings } from './domain/deps';
import { noVisitNotifications, type NotifyVisitEvent } from './domain/notifications';
import { VisitModelSettings1765324800000 } from '../database/migrations/1765324800000-visit-model-settings';
import {
  VisitCaseEntity,
  VisitEntity,
  VisitEventEntity,
  VisitModelSettingEntity,
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
// Reports (evaluation evidence) show the proctor fees of a loan's visits through this read.
export { loanVisitFees, type LoanVisitFee } from './domain/fees';

/** The component's tables. */
export const visitEntities = [
  VisitEntity,
  VisitOfferEntity,
  VisitEventEntity,
  VisitCaseEntity,
  VisitSignOffEntity,
  VisitModelSettingEntity,
];

/** Visit settings from the server configuration (`EVALON_VISIT_OFFER_HOURS`, `EVALON_VISIT_TRAVEL_DAY_KM`). */
export function visitSettingsFromConfig(config: Pick<Config, 'visits'>): VisitSettings {
  return {
    ...defaultVisitSettings,
    offerHours: config.visits.offerHours,
    travelDayThresholdKm: config.visits.travelDayThresholdKm,
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
    settings: { ...defaultVisitSettings, ...input.settings },
  };
}
export {
  acceptOffer,
  cancelVisit,
  declineOffer,
  reopenVisit,
  requestVisit,
  withdrawFromVisit,
} from './domain/offers';
export { completeVisit, recordCase, signOffTrainee } from './domain/records';

/** Proctoring visits, `/api/visits`, and the offer-deadline job. */
export const visitsComponent: AppComponent = {
  name: 'visits',
  entities: visitEntities,
  migrations: [VisitModelSettings1765324800000],
  routers: (ctx) => [
    visitRoutes(
      createVisitDeps({
        dataSource: ctx.dataSource,
        logger: ctx.logger,
        now: ctx.now,
        notifyVisitEvent: ctx.services.notifyVisitEvent,
        settings: visitSettingsFromConfig(ctx.config),
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
              settings: visitSettingsFromConfig(ctx.config),
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
