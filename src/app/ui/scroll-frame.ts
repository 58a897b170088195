import { DestroyRef, Directive, ElementRef, afterNextRender, inject, input, signal } from '@angular/core';

/**
 * The frame of a table wider than the screen (a phone, or many regions side by side): the table
 * scrolls sideways inside it, never the page. The frame is a region named "<label>, scrolls
 * sideways", and while its content is wider than it, it takes the keyboard focus (Tab), so the
 * arrow keys scroll it (WCAG 2.1.1; axe's scrollable-region-focusable). When everything fits it is
 * no stop on the Tab path.
 *
 *   <div [appScrollFrame]="'Tenders'"><table …></table></div>
 */
@Directive({
  selector: '[appScrollFrame]',
  host: {
    class: 'scroll-frame',
    role: 'region',
    '[attr.aria-label]': "label() + ', scrolls sideways'",
    '[attr.tabindex]': 'overflows() ? 0 : null',
  },
})
export class ScrollFrame {
  /** What the table holds ("Tenders", "Unit price per region"). */
  readonly label = input.required<string>({ alias: 'appScrollFrame' });
  protected readonly overflows = signal(false);

  constructor() {
    const host = inject<ElementRef<HTMLElement>>(ElementRef).nativeElement;
    const destroyRef = inject(DestroyRef);
    afterNextRender(() => {
      const measure = () => this.overflows.set(host.scrollWidth > host.clientWidth + 1);
      measure();
      // jsdom (component tests) has no ResizeObserver; the frame then stays as first measured.
      if (typeof ResizeObserver === 'undefined') return;
      // The frame changes size with the window; its table, when rows arrive or columns change.
      const observer = new ResizeObserver(measure);
      observer.observe(host);
      const observeContent = () => {
        for (const child of Array.from(host.children)) observer.observe(child);
      };
      observeContent();
      const mutations = new MutationObserver(() => {
        observeContent();
        measure();
      });
      mutations.observe(host, { childList: true });
      destroyRef.onDestroy(() => {
        observer.disconnect();
        mutations.disconnect();
      });
    });
  }
}
