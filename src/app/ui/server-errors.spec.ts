import { FormArray, FormControl, FormGroup } from '@angular/forms';
import { applyServerErrors } from './server-errors';

describe('applyServerErrors (the server\'s field errors under their fields)', () => {
  const form = () => new FormGroup({
    reason: new FormControl('', { nonNullable: true }),
    regions: new FormArray([0, 1].map(() => new FormGroup({ forecast: new FormControl<number | null>(null) }))),
  });

  it('places an error the server names as regions[1].forecast on that region\'s forecast control', () => {
    const f = form();
    const unplaced = applyServerErrors(f, [{ field: 'regions[1].forecast', message: 'Must be a whole multiple of 25 t.' }]);
    expect(unplaced).toEqual([]);
    expect(f.get('regions.1.forecast')!.errors).toEqual({ server: 'Must be a whole multiple of 25 t.' });
    expect(f.get('regions.1.forecast')!.touched).toBe(true);
    expect(f.get('regions.0.forecast')!.errors).toBeNull();
  });

  it('returns the errors of fields the form does not have, with their field, for the form-level line', () => {
    const f = form();
    expect(applyServerErrors(f, [{ field: 'closesAt', message: 'Shortening is refused.' }, { field: '', message: 'Bidding closed.' }]))
      .toEqual(['closesAt: Shortening is refused.', 'Bidding closed.']);
  });
});
