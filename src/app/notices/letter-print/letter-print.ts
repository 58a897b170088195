import { ChangeDetectionStrategy, Component, ViewEncapsulation, computed, input } from '@angular/core';

/**
 * The letter's body, ready for Angular's [innerHTML] binding: parsed in an inert document (no
 * script runs, no image loads), stripped of scripts, event handlers, embedded styles and style
 * attributes (the print stylesheet below gives it one clean typeface instead), and reduced to
 * the body, so that the document's <title> does not end up as stray text. Angular's own sanitiser still checks the
 * result when it is bound; this step only spares it (and the console) the stripping.
 */
export function printableBody(html: string): string {
  const parsed = new DOMParser().parseFromString(html, 'text/html');
  parsed.querySelectorAll('script, style, link, meta, title, iframe, object, embed').forEach((node) => node.remove());
  parsed.body.querySelectorAll('*').forEach((element) => {
    Array.from(element.attributes)
      .map((attribute) => attribute.name)
      .filter((name) => name === 'style' || name.startsWith('on'))
      .forEach((name) => element.removeAttribute(name));
  });
  return parsed.body.innerHTML;
}

/**
 * The printable copy of a letter and the page's print stylesheet.
 *
 * Why not print the screen's iframe: with `sandbox=""` its document cannot be reached
 * (`contentWindow.print()` is refused), and a printed page shows only the part of the frame
 * that fits its box. Loosening the sandbox (`allow-modals`, `allow-same-origin`) to reach it
 * would hand the letter's markup powers it does not need. So the letter is rendered a second
 * time, for paper only, through Angular's HTML sanitiser: scripts, event handlers and unsafe
 * URLs cannot survive it, while headings, paragraphs and the tables of regions and prices do.
 *
 * Encapsulation is off on purpose: hiding the app's frame (toolbar, navigation, skip link)
 * needs rules that reach outside this component. Angular adds these rules while a letter is
 * shown and removes them with it, so no other page prints differently.
 */
@Component({
  selector: 'app-letter-print',
  changeDetection: ChangeDetectionStrategy.OnPush,
  encapsulation: ViewEncapsulation.None,
  template: `<div class="letter-print-body" [innerHTML]="body()"></div>`,
  styleUrl: './letter-print.scss',
})
export class LetterPrint {
  readonly html = input.required<string>();

  protected readonly body = computed(() => printableBody(this.html()));
}
