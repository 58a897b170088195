import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';

/** Any address the app does not know. */
@Component({
  selector: 'app-not-found',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButtonModule, MatIconModule],
  template: `
    <div class="page message">
      <mat-icon class="big" aria-hidden="true">explore_off</mat-icon>
      <h1>Page not found</h1>
      <p class="lead">There is no page at this address. It may have moved, or the link may be mistyped.</p>
      <a mat-flat-button routerLink="/">Back to overview</a>
    </div>
  `,
  styleUrl: '../no-access/no-access.scss',
})
export class NotFound {}
