/**
 * The proctors component's front door: proctor profiles, experience per model, credentials
 * (with their PDFs) and availability. Other components import from here only.
 */
import type { DataSource } from 'typeorm';
import type { AppComponent } from '../app-services';
import { Proctoring1765065600000 } from '../database/migrations/1765065600000-proctoring';
import { credentialNotifierFromConfig } from '../notifications';
import { proctorRoutes } from './api/routes';
import { startCredentialWarningJob } from './domain/credential-warnings';
import type { FileStore } from '../storage/file-store';
import type { Logger } from '../logger';
import type { ProctorDeps } from './domain/deps';
import {
  ProctorCredentialEntity,
  ProctorExperienceEntity,
  ProctorProfileEntity,
} from './data-access/entities';

export { proctorRoutes } from './api/routes';
export type { ProctorDeps } from './domain/deps';
export {
  credentialStatus,
  credentialWarningDays,
  loadProfile,
  proctorOrganisation,
} from './domain/profile';
export {
  addRecordedCases,
  claimExpiringCredentials,
  findBusyRanges,
  findCredentials,
  findExperience,
  findProfile,
  findProfiles,
  markCredentialWarned,
  touchLastOffered,
} from './data-access/proctor-repository';
export type { ProctorCredentialRow, ProctorProfileRow } from './data-access/entities';

/** The component's tables. */
export const proctorEntities = [
  ProctorProfileEntity,
  ProctorExperienceEntity,
  ProctorCredentialEntity,
];

/** The proctors component's dependencies. */
export function createProctorDeps(input: {
  dataSource: DataSource;
  logger: Logger;
  now?: () => Date;
  credentialStore: FileStore;
}): ProctorDeps {
  return {
    dataSource: input.dataSource,
    logger: input.logger,
    credentialStore: input.credentialStore,
    now: input.now ?? (() => new Date()),
  };
}
export {
  insertCredential,
  replaceDeclaredExperience,
  updateAvailability,
  upsertProfile,
} from './data-access/proctor-repository';
export {
  runCredentialWarnings,
  startCredentialWarningJob,
  type NotifyCredentialExpiring,
} from './domain/credential-warnings';

/**
 * Proctor profiles, credentials and availability, `/api/proctors`, and the credential warning
 * job. The proctoring migration creates the visits component's tables too (one change).
 */
export const proctorsComponent: AppComponent = {
  name: 'proctors',
  entities: proctorEntities,
  migrations: [Proctoring1765065600000],
  routers: (ctx) => [
    proctorRoutes(
      createProctorDeps({
        dataSource: ctx.dataSource,
        logger: ctx.logger,
        now: ctx.now,
        credentialStore: ctx.services.credentialStore,
      }),
      ctx.catalogue,
    ),
  ],
  jobs: (ctx) => {
    // Credentials ending within 60 days are warned about once; SKIP LOCKED lets any number of
    // processes run it.
    let job: { stop(): Promise<void> } | null = null;
    return [
      {
        name: 'credential warning job',
        details: {},
        start: () => {
          job = startCredentialWarningJob({
            dataSource: ctx.dataSource,
            logger: ctx.logger,
            now: () => new Date(),
            notify: credentialNotifierFromConfig(ctx.config),
          });
        },
        stop: async () => {
          await job?.stop();
        },
      },
    ];
  },
};
