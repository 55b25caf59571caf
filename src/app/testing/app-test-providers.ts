import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { provideHttpClientTesting } from '@angular/common/http/testing';
import { ErrorHandler, provideZonelessChangeDetection, type EnvironmentProviders, type Provider } from '@angular/core';
import { ErrorStateMatcher, MATERIAL_ANIMATIONS, ShowOnDirtyErrorStateMatcher } from '@angular/material/core';
import { provideRouter, withComponentInputBinding, type Routes } from '@angular/router';
import { appRequestHeaderInterceptor } from '../http/app-request-header';
import { AppErrorHandler } from '../errors/app-error-handler';
import { httpErrorInterceptor } from '../errors/http-error-interceptor';

/**
 * The app's own providers (error handler, interceptor, validation shown as you type) with the HTTP
 * backend replaced by HttpTestingController and animations off.
 */
export function appTestProviders(routes: Routes = []): (Provider | EnvironmentProviders)[] {
  return [
    provideZonelessChangeDetection(),
    { provide: ErrorHandler, useClass: AppErrorHandler },
    provideRouter(routes, withComponentInputBinding()),
    provideHttpClient(withInterceptors([appRequestHeaderInterceptor, httpErrorInterceptor])),
    provideHttpClientTesting(),
    { provide: ErrorStateMatcher, useClass: ShowOnDirtyErrorStateMatcher },
    { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
  ];
}

/**
 * Lets the promise chains started by a flushed reply run (a reply resolves a promise, whose caller then
 * navigates or updates a signal), then waits for the view to be stable.
 */
export async function settle(fixture: { whenStable(): Promise<unknown> }): Promise<void> {
  await new Promise((resolve) => setTimeout(resolve));
  await fixture.whenStable();
}
