import { inject } from '@angular/core';
import { MatDialog } from '@angular/material/dialog';
import type { CanDeactivateFn } from '@angular/router';
import { defaultIfEmpty, type Observable } from 'rxjs';
import { whenConfirmed, type ConfirmData } from './confirm-dialog';

/** A page that holds figures the person has not saved yet. */
export interface HoldsUnsavedChanges {
  unsavedChanges(): boolean;
}

/**
 * Route guard: leaving a page with unsaved figures (typed, or read from an uploaded workbook) asks
 * first. Closing or reloading the tab is covered by the page's own `beforeunload` listener.
 */
export const confirmLeavingUnsaved: CanDeactivateFn<HoldsUnsavedChanges> = (page): boolean | Observable<boolean> => {
  if (!page.unsavedChanges()) return true;
  const question: ConfirmData = {
    title: 'Leave without saving?',
    message: 'Your figures on this page are not saved. If you leave now they are lost; nothing was sent to the buyer.',
    confirm: 'Leave without saving',
    destructive: true,
  };
  // Leaves only once confirmed; cancelling (or closing the dialog) stays on the page.
  return whenConfirmed(inject(MatDialog), question).pipe(defaultIfEmpty(false));
};
