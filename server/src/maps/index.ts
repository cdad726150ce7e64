// The maps component's front door: the app uses only what is exported here.
import type { AppComponent } from '../app-services';
import { mapsRoutes } from './api/routes';

export { mapsOptionsFromConfig, type MapsOptions } from './api/routes';

/** The maps script (hosted with a key, else the offline stand-in) and `/api/config`. */
export const mapsComponent: AppComponent = {
  name: 'maps',
  routers: (ctx) => mapsRoutes(ctx.services.maps, ctx.catalogue),
};
