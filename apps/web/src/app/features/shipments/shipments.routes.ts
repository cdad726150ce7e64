import { Routes } from '@angular/router';
import { ShipmentBoard } from './shipment-board';
import { ShipmentPage } from './shipment-page';

/** `/shipments`: the coordinator's board and one shipment (hospital people open shipments too). */
export const shipmentsRoutes: Routes = [
  { path: '', component: ShipmentBoard, title: 'Shipments' },
  { path: ':id', component: ShipmentPage, title: 'Shipment' },
];
