import { ChangeDetectionStrategy, Component } from '@angular/core';

/** Tendara's mark: the same drawing as src/favicon.svg, decorative next to the product name. */
@Component({
  selector: 'app-logo',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <svg viewBox="0 0 32 32" width="28" height="28" aria-hidden="true" focusable="false">
      <rect width="32" height="32" rx="7" fill="#1f5c4a" />
      <path d="M8 9.5h16v4h-6v11h-4v-11H8z" fill="#ffffff" />
      <circle cx="24" cy="22.5" r="3" fill="#e07a4f" />
    </svg>
  `,
  styles: `
    :host { display: inline-flex; }
    svg { display: block; }
  `,
})
export class Logo {}
