import { TestBed } from '@angular/core/testing';
import type { RegionView } from '@shared/tenders';
import { quantity } from '../../ui/number-format';
import { RegionTable } from './region-table';

/** Renders the table for `regions` and returns its footer's row header and total. */
async function footer(regions: RegionView[]): Promise<{ label: string; total: string }> {
  const fixture = TestBed.createComponent(RegionTable);
  fixture.componentRef.setInput('regions', regions);
  fixture.componentRef.setInput('unit', 't');
  await fixture.whenStable();
  const row = fixture.nativeElement.querySelector('tr.mat-mdc-footer-row') as HTMLElement;
  return {
    label: row.querySelector('th')?.textContent?.trim() ?? '',
    total: row.querySelector('td.total')?.textContent?.trim() ?? '',
  };
}

describe('RegionTable (a tender’s regions with the forecast total)', () => {
  it('counts one region in the singular', async () => {
    const { label, total } = await footer([{ code: 'HVN', name: 'Havenmoor', forecast: 400 }]);
    expect(label).toBe('Total (1 region)');
    expect(total).toBe(quantity(400));
  });

  it('counts several regions in the plural and sums their forecasts', async () => {
    const { label, total } = await footer([
      { code: 'HVN', name: 'Havenmoor', forecast: 400 },
      { code: 'QSL', name: 'Quillsby', forecast: 1250.5 },
    ]);
    expect(label).toBe('Total (2 regions)');
    expect(total).toBe(quantity(1650.5));
  });
});
