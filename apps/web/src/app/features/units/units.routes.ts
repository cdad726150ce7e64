import { Routes } from '@angular/router';
import { UnitDetail } from './unit-detail';
import { UnitList } from './unit-list';

/** `/units`: the fleet's units and one unit's calendar (coordinators read-only). */
export const unitsRoutes: Routes = [
  { path: '', component: UnitList, title: 'Units' },
  { path: ':unitId', component: UnitDetail, title: 'Unit' },
];
