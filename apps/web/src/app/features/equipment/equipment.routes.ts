import { Routes } from '@angular/router';
import { EquipmentSearch } from './equipment-search';
import { UnitPage } from './unit-page';

/** `/equipment`: find equipment, and one unit's page. */
export const equipmentRoutes: Routes = [
  { path: '', component: EquipmentSearch, title: 'Find equipment' },
  { path: 'units/:unitId', component: UnitPage, title: 'Unit details' },
];
