/**
 * The proctors component's front door: proctor profiles, experience per model, credentials
 * (with their PDFs) and availability. Other components import from here only.
 */
import type { DataSource } from 'typeorm';
import type { PhotoStore } from '../catalog/domain/photo-store';
import type { Logger } from '../logger';
import type { ProctorDeps } from './domain/deps';
import { credentialStoreFromEnv } from './domain/profile';
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
  credentialStore?: PhotoStore;
}): ProctorDeps {
  return {
    dataSource: input.dataSource,
    logger: input.logger,
    credentialStore: input.credentialStore ?? credentialStoreFromEnv(),
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
