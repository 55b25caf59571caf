import { ChangeDetectionStrategy, Component } from '@angular/core';
import { RouterLink } from '@angular/router';

@Component({
  selector: 'pl-not-found',
  imports: [RouterLink],
  template: `
    <section class="page">
      <h1>Page not found</h1>
      <p>There is no page at this address. <a routerLink="/projects">Go to the projects</a>.</p>
    </section>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotFound {}
