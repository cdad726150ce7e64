import {
  provideHttpClient,
  withFetch,
  withInterceptors,
  withXsrfConfiguration,
} from '@angular/common/http';
import {
  ApplicationConfig,
  inject,
  provideAppInitializer,
  provideBrowserGlobalErrorListeners,
  provideZonelessChangeDetection,
} from '@angular/core';
import { MatIconRegistry } from '@angular/material/icon';
import {
  TitleStrategy,
  provideRouter,
  withComponentInputBinding,
  withInMemoryScrolling,
} from '@angular/router';
import { routes } from './app.routes';
import { errorInterceptor, xsrfNames, xsrfTokenInterceptor } from './core/interceptors';
import { EvalonTitleStrategy } from './core/page-title';

/** Application-wide providers. */
export const appConfig: ApplicationConfig = {
  providers: [
    provideBrowserGlobalErrorListeners(),
    provideZonelessChangeDetection(),
    provideRouter(
      routes,
      withComponentInputBinding(),
      withInMemoryScrolling({ scrollPositionRestoration: 'top' }),
    ),
    provideHttpClient(
      withFetch(),
      withXsrfConfiguration(xsrfNames),
      withInterceptors([xsrfTokenInterceptor, errorInterceptor]),
    ),
    { provide: TitleStrategy, useClass: EvalonTitleStrategy },
    provideAppInitializer(() => {
      // Icons are ligatures of the self-hosted Material Symbols font (see styles.scss).
      inject(MatIconRegistry).setDefaultFontSetClass('material-symbols-outlined');
    }),
  ],
};
