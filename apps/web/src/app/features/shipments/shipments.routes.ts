import { Routes } from '@angular/router';
import { roleGuard } from '../../core/guards';
import { ShipmentBoard } from './shipment-board';
import { ShipmentPage } from './shipment-page';

/** `/shipments`: the coordinator's board and one shipment (hospital people open shipments too). */
export const shipmentsRoutes: Routes = [
  { path: '', component: ShipmentBoard, title: 'Shipments' },
  {
    // The lender's map of legs with the carrier; loaded on first visit (maps code stays out).
    path: 'map',
    canActivate: [roleGuard('coordinator', 'fleet_manager', 'admin')],
    loadComponent: () => import('./shipment-map').then((m) => m.ShipmentMap),
    title: 'Shipments in transit',
  },
  { path: ':id', component: ShipmentPage, title: 'Shipment' },
];
