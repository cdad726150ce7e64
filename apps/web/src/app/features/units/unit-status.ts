import type { UnitStatus } from '@evalon/contracts';
import type { PillTone } from '../../shared/status-pill/status-pill';

/*
 * How a unit status looks on screen. The statuses and their words come from
 * `@evalon/contracts/values` (`unitStatuses`, `unitStatusLabels`); only the look lives here.
 */

/** Icons beside each unit status. */
export const unitStatusIcons: Readonly<Record<UnitStatus, string>> = {
  active: 'check_circle',
  maintenance: 'build',
  retired: 'inventory',
};

/** Pill colour of each unit status. */
export const unitStatusTones: Readonly<Record<UnitStatus, PillTone>> = {
  active: 'secondary',
  maintenance: 'tertiary',
  retired: 'neutral',
};
