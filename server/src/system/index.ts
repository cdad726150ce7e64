// The system component's front door: the app uses only what is exported here.
import type { AppComponent } from '../app-services';
import { systemRoutes } from './api/routes';

/** `/api/health` and `/api/openapi.json`. */
export const systemComponent: AppComponent = {
  name: 'system',
  routers: (ctx) => [systemRoutes(ctx.dataSource, ctx.config.http.publicUrl, ctx.catalogue)],
};
