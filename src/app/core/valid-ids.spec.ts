import { TestBed } from '@angular/core/testing';
import { provideRouter, Router } from '@angular/router';
import { Component } from '@angular/core';
import { RouterTestingHarness } from '@angular/router/testing';
import { validIds } from './valid-ids';

@Component({ template: '<h1>Tender page</h1>' })
class TenderPage {}

@Component({ template: '<h1>Page not found</h1>' })
class NotFoundPage {}

describe('validIds', () => {
  beforeEach(() => {
    harness = undefined;
    TestBed.configureTestingModule({
      providers: [
        provideRouter([
          { path: 'tenders/:id', canMatch: [validIds], component: TenderPage },
          { path: 'tenders/:id/evaluation/runs/:runId', canMatch: [validIds], component: TenderPage },
          { path: '**', component: NotFoundPage },
        ]),
      ],
    });
  });

  let harness: RouterTestingHarness | undefined;
  async function heading(url: string): Promise<string> {
    harness ??= await RouterTestingHarness.create();
    await harness.navigateByUrl(url);
    return (harness.routeNativeElement as HTMLElement).querySelector('h1')!.textContent;
  }

  it('opens the page for a well-formed id', async () => {
    expect(await heading('/tenders/0d6f4b9e-93a1-4d1f-8a55-1c2f7b3e9a10')).toBe('Tender page');
  });

  it('shows "Page not found" for a mistyped or cut-off id, in any id parameter', async () => {
    expect(await heading('/tenders/0d6f4b9e-93a1-4d1f-8a55')).toBe('Page not found');
    expect(await heading('/tenders/not-a-tender')).toBe('Page not found');
    expect(await heading('/tenders/0d6f4b9e-93a1-4d1f-8a55-1c2f7b3e9a10/evaluation/runs/42')).toBe('Page not found');
    expect(TestBed.inject(Router).url).toBe('/tenders/0d6f4b9e-93a1-4d1f-8a55-1c2f7b3e9a10/evaluation/runs/42');
  });
});
