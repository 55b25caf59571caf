import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialog } from '@angular/material/dialog';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { RouterTestingHarness } from '@angular/router/testing';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { ChangePasswordDialog } from './change-password-dialog';

describe('ChangePasswordDialog', () => {
  let http: HttpTestingController;

  async function open() {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const harness = await RouterTestingHarness.create();
    TestBed.inject(MatDialog).open(ChangePasswordDialog);
    await settle(harness.fixture);
    const loader = TestbedHarnessEnvironment.documentRootLoader(harness.fixture);
    const input = (name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
    const errorsOf = async (label: string) =>
      (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))).getTextErrors();
    const submit = () => loader.getHarness(MatButtonHarness.with({ text: 'Change password' }));
    return { harness, loader, input, errorsOf, submit };
  }

  afterEach(() => http.verify());

  it('checks the new password with the shared rule and the repetition as the user types', async () => {
    const { input, errorsOf, submit } = await open();
    await (await input('newPassword')).setValue('short');
    expect(await errorsOf('New password')).toEqual(['New password must have at least 10 characters']);
    await (await input('newPassword')).setValue('a longer passphrase');
    await (await input('repeated')).setValue('a longer passphras');
    expect(await errorsOf('New password again')).toEqual(['New password again must repeat the new password']);
    await (await submit()).click();
    http.expectNone('/api/auth/password');
  });

  it('sends the change and marks a wrong current password on its field, keeping the new one', async () => {
    const { harness, loader, input, errorsOf, submit } = await open();
    await (await input('currentPassword')).setValue('what I think it is');
    await (await input('newPassword')).setValue('a longer passphrase');
    await (await input('repeated')).setValue('a longer passphrase');
    await (await submit()).click();
    const request = http.expectOne('/api/auth/password');
    expect(request.request.body).toEqual({ currentPassword: 'what I think it is', newPassword: 'a longer passphrase' });
    request.flush(
      {
        error: {
          code: 'validation_failed',
          message: 'currentPassword: is not your current password',
          details: { issues: [{ path: 'currentPassword', message: 'is not your current password' }] },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await settle(harness.fixture);
    expect(await errorsOf('Current password')).toEqual(['Current password is not your current password']);
    expect(await (await input('newPassword')).getValue()).toBe('a longer passphrase');
    expect(await loader.getAllHarnesses(MatDialogHarness)).toHaveLength(1);
  });
});
