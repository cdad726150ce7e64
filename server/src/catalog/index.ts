/**
 * The catalog component's front door for other components (units, holds): they import from
 * here, never from its data-access files.
 */
export { lockUnits, bumpBookingVersion } from './data-access/catalog-repository';
export { insertHolds, type NewHold } from './data-access/hold-repository';
export {
  hospitalsOf,
  isBuyerOf,
  isFleetManagerOf,
  lendersOf,
  worksForHospital,
  worksForLender,
} from './domain/scope';
