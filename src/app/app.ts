import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { RouterOutlet } from '@angular/router';
import { ThemePreference } from './shell/theme-preference';

/** The root: every screen, the sign-in page included, is a route; the chosen theme applies to all. */
@Component({
  selector: 'pl-root',
  imports: [RouterOutlet],
  template: '<router-outlet />',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class App {
  protected readonly theme = inject(ThemePreference);
}
