import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { VendorAward } from '@shared/award';
import { regionPageSizes } from '../../ui/region-pages';
import { AllocationMatrix, type MatrixRegion } from './allocation-matrix';

const regions = (n: number): MatrixRegion[] =>
  Array.from({ length: n }, (_, k) => ({ code: `R${String(k + 1).padStart(3, '0')}`, name: `Region ${k + 1}`, forecast: 100 }));

/** Vendor V1 supplies every region, 100 units each. */
const award = (rs: MatrixRegion[]): VendorAward =>
  ({ vendor: 'V1', lines: rs.map((r) => ({ region: r.code, quantity: r.forecast })) }) as unknown as VendorAward;

function render(rs: MatrixRegion[]) {
  TestBed.configureTestingModule({
    imports: [AllocationMatrix],
    providers: [{ provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
  });
  const fixture = TestBed.createComponent(AllocationMatrix);
  fixture.componentRef.setInput('awards', [award(rs)]);
  fixture.componentRef.setInput('regions', rs);
  fixture.componentRef.setInput('vendorNames', { V1: { name: 'Northfell Minerals' } });
  fixture.componentRef.setInput('unit', 't');
  fixture.detectChanges();
  const el = fixture.nativeElement as HTMLElement;
  const heads = () => [...el.querySelectorAll('thead th[scope=col]')].slice(1).map((th) => th.firstChild!.textContent!.trim());
  const cells = () => el.querySelectorAll('tbody td').length;
  return { fixture, el, heads, cells };
}

describe('AllocationMatrix', () => {
  it('draws a tender of 20 regions whole, with no pager', () => {
    const { el, heads, cells } = render(regions(20));
    expect(heads()).toHaveLength(20);
    expect(cells()).toBe(20);
    expect(el.querySelector('mat-paginator')).toBeNull();
  });

  it('draws 200 regions 25 at a time and pages through them with the region pager', async () => {
    const { fixture, el, heads, cells } = render(regions(200));
    expect(heads()).toEqual(regions(25).map((r) => r.code));
    expect(cells()).toBe(25);
    expect(el.querySelector('.mat-mdc-paginator-range-label')!.textContent.trim()).toBe('Regions 1–25 of 200');

    (el.querySelector('button[aria-label="Next regions"]') as HTMLButtonElement).click();
    fixture.detectChanges();
    await fixture.whenStable();
    expect(heads()[0]).toBe('R026');
    expect(heads()).toHaveLength(25);

    (el.querySelector('button[aria-label="Last regions"]') as HTMLButtonElement).click();
    fixture.detectChanges();
    expect(heads()[heads().length - 1]).toBe('R200');
    expect(el.querySelector('.mat-mdc-paginator-range-label')!.textContent.trim()).toBe('Regions 176–200 of 200');
  });

  it('offers every region at once as the largest page size', () => {
    expect(regionPageSizes(200)).toEqual([25, 50, 100, 200]);
    expect(regionPageSizes(60)).toEqual([25, 50, 60]);
    expect(regionPageSizes(30)).toEqual([25, 30]);
  });
});
