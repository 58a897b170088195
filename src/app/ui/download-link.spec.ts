import { provideHttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { DownloadLink } from './download-link';

@Component({
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DownloadLink],
  template: `<app-download-link href="/api/tenders/t1/report.pdf" icon="picture_as_pdf">Evaluation report (PDF)</app-download-link>`,
})
class Host {}

describe('DownloadLink (an export link that shows its progress)', () => {
  it('puts its icon in the button’s icon slot, beside the label rather than inside it', async () => {
    TestBed.configureTestingModule({ providers: [provideHttpClient()] });
    const fixture = TestBed.createComponent(Host);
    await fixture.whenStable();
    const link = fixture.nativeElement.querySelector('a') as HTMLAnchorElement;
    const icon = link.querySelector('mat-icon') as HTMLElement;
    // Material sizes and spaces an icon that is a child of the button itself (`.mat-mdc-button > .mat-icon`).
    expect(icon.parentElement).toBe(link);
    expect(icon.textContent?.trim()).toBe('picture_as_pdf');
    expect(link.querySelector('.mdc-button__label')?.textContent?.trim()).toBe('Evaluation report (PDF)');
    expect(link.getAttribute('href')).toBe('/api/tenders/t1/report.pdf');
  });
});
