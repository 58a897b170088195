import { ChangeDetectionStrategy, Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { ScrollFrame } from './scroll-frame';

@Component({
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ScrollFrame],
  template: `<div appScrollFrame="Tenders"><table aria-label="Tenders"><tr><td>NHP-2027-002</td></tr></table></div>`,
})
class Host {}

/** Renders the host with the frame's content `contentWidth` px wide in a frame `frameWidth` px wide (jsdom lays nothing out). */
async function render(contentWidth: number, frameWidth: number): Promise<HTMLElement> {
  const fixture = TestBed.createComponent(Host);
  const frame = fixture.nativeElement.querySelector('[appScrollFrame]') as HTMLElement;
  Object.defineProperty(frame, 'scrollWidth', { configurable: true, value: contentWidth });
  Object.defineProperty(frame, 'clientWidth', { configurable: true, value: frameWidth });
  await fixture.whenStable();
  return frame;
}

describe('ScrollFrame (the frame a wide table scrolls in)', () => {
  it('is a region named after its table, "scrolls sideways"', async () => {
    const frame = await render(300, 300);
    expect(frame.getAttribute('role')).toBe('region');
    expect(frame.getAttribute('aria-label')).toBe('Tenders, scrolls sideways');
  });

  it('takes the keyboard focus while its table is wider than it', async () => {
    const frame = await render(900, 358);
    expect(frame.getAttribute('tabindex')).toBe('0');
  });

  it('is no stop on the Tab path when the table fits', async () => {
    const frame = await render(300, 300);
    expect(frame.hasAttribute('tabindex')).toBe(false);
  });
});
