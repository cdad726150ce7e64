import type { DataSource } from 'typeorm';
import type { Logger } from '../../logger';
import type { NotifyVisitEvent } from './notifications';

/** Settings of the visit flow (product defaults, overridable by environment). */
export interface VisitSettings {
  /** How long a proctor has to answer an offer (default 48 h). */
  offerHours: number;
  /** Above this great-circle distance a proctor travels the day before and after (500 km). */
  travelDayThresholdKm: number;
  /** How many eligible candidates Evalon lines up when the requester does not pick (5). */
  autoCandidates: number;
}

export const defaultVisitSettings: VisitSettings = {
  offerHours: 48,
  travelDayThresholdKm: 500,
  autoCandidates: 5,
};

/** What the visit use cases need. */
export interface VisitDeps {
  dataSource: DataSource;
  logger: Logger;
  now: () => Date;
  settings: VisitSettings;
  /** Called inside each visit-changing transaction. */
  notifyVisitEvent: NotifyVisitEvent;
}
