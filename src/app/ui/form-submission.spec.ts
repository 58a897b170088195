import { DestroyRef, Injector, runInInjectionContext } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormControl, FormGroup, Validators } from '@angular/forms';
import { EMPTY, Subject, of, throwError } from 'rxjs';
import { ApiError } from '../core/http/api-error';
import { formSubmission } from './form-submission';

const form = () => new FormGroup({
  name: new FormControl('Depot north', { nonNullable: true, validators: (control) => Validators.required(control) }),
  forecast: new FormControl<number | null>(120),
});

function submissionOf(f: FormGroup, options: Parameters<typeof formSubmission>[2] = {}) {
  return runInInjectionContext(TestBed.inject(Injector), () => formSubmission(f, TestBed.inject(DestroyRef), options));
}

describe('formSubmission (the one way a form sends)', () => {
  it('sends nothing while a field is invalid, marks the fields and says so on the form line', () => {
    const f = form();
    f.controls.name.setValue('');
    const submission = submissionOf(f, { invalidMessage: 'Some fields need attention.' });
    let asked = 0;
    expect(submission.send(() => { asked++; return of('sent'); }, () => undefined)).toBe(false);
    expect(asked).toBe(0);
    expect(f.controls.name.touched).toBe(true);
    expect(submission.failure()).toBe('Some fields need attention.');
    expect(submission.busy()).toBe(false);
  });

  it('stops on a problem of its check (not a validator\'s), placed under its field', () => {
    const f = form();
    const submission = submissionOf(f, {
      invalidMessage: 'Some fields need attention.',
      check: () => [{ field: 'forecast', message: 'Forecast must be a whole multiple of 25.' }, { field: 'closesAt', message: 'Too early.' }],
    });
    expect(submission.send(() => of('sent'), () => undefined)).toBe(false);
    expect(f.controls.forecast.errors).toEqual({ server: 'Forecast must be a whole multiple of 25.' });
    expect(submission.failure()).toBe('Some fields need attention. closesAt: Too early.');
  });

  it('is busy while the request is in flight, refuses a second send meanwhile, and hands the answer over', () => {
    const submission = submissionOf(form());
    const answer = new Subject<string>();
    const received: string[] = [];
    expect(submission.send(() => answer, (a) => received.push(a))).toBe(true);
    expect(submission.busy()).toBe(true);
    expect(submission.send(() => of('second'), (a) => received.push(a))).toBe(false);
    answer.next('stored');
    expect(received).toEqual(['stored']);
    expect(submission.busy()).toBe(false);
  });

  it('puts a refusal under its field and the message on the form line, then gives the problem to `refused`', () => {
    const f = form();
    const submission = submissionOf(f);
    const problem = new ApiError(409, 'Conflict', 'The tender changed meanwhile.', [{ field: 'forecast', message: 'Changed by an amendment.' }]);
    const seen: number[] = [];
    submission.send(() => throwError(() => problem), () => undefined, (p) => seen.push(p.status));
    expect(f.controls.forecast.errors).toEqual({ server: 'Changed by an amendment.' });
    expect(submission.failure()).toBe('The tender changed meanwhile.');
    expect(seen).toEqual([409]);
    expect(submission.busy()).toBe(false);
  });

  it('run() sends without checking the fields, and a request that ends with no answer (a declined confirmation) ends busy', () => {
    const f = form();
    f.controls.name.setValue('');
    const submission = submissionOf(f);
    let done = 0;
    expect(submission.run(() => EMPTY, () => done++)).toBe(true);
    expect(done).toBe(0);
    expect(submission.busy()).toBe(false);
  });
});
