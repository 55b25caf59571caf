import { HttpClient } from '@angular/common/http';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { firstValueFrom } from 'rxjs';
import { beforeEach, describe, expect, it } from 'vitest';
import { appTestProviders } from '../testing/app-test-providers';

// The server refuses a form, multipart or text/plain change without this header
// (server/security/cross-site-requests.ts); the name is ours (shared/api/request-header.ts).
describe('appRequestHeaderInterceptor', () => {
  let http: HttpClient;
  let backend: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpClient);
    backend = TestBed.inject(HttpTestingController);
  });

  it('sends the header with JSON and multipart requests to the API', async () => {
    const form = new FormData();
    form.append('description', 'certificate');
    const upload = firstValueFrom(http.post('/api/devices/d1/evidence', form));
    const call = backend.expectOne('/api/devices/d1/evidence');
    expect(call.request.headers.get('X-Proofline-Request')).toBe('1');
    call.flush({});
    await upload;
    const read = firstValueFrom(http.get('/api/projects'));
    const get = backend.expectOne('/api/projects');
    expect(get.request.headers.get('X-Proofline-Request')).toBe('1');
    get.flush([]);
    await read;
  });

  it('does not send it to other hosts', async () => {
    const read = firstValueFrom(http.get('https://elsewhere.invalid/api/x'));
    const call = backend.expectOne('https://elsewhere.invalid/api/x');
    expect(call.request.headers.has('X-Proofline-Request')).toBe(false);
    call.flush({});
    await read;
  });
});
