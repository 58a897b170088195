import { dictionary } from '@zxcvbn-ts/language-common';
import { ValidationError } from '../http/errors';

/**
 * About 49,000 passwords most often found in leaked lists, shipped inside the
 * `@zxcvbn-ts/language-common` package (nothing is fetched at run time). Compared in lower case
 * and without white space, so `Password Password` counts as `passwordpassword`.
 */
let common: Set<string> | undefined;
const squash = (password: string) => password.normalize('NFKC').toLowerCase().replace(/\s+/gu, '');

export function isCommonPassword(password: string): boolean {
  common ??= new Set(dictionary['passwords-common'].map(squash));
  return common.has(squash(password));
}

/** Throws the 400 that names the `password` field when the password is a common one. */
export function refuseCommonPassword(password: string): void {
  if (isCommonPassword(password)) {
    throw new ValidationError([{ field: 'password', message: 'This password is one of the most common ones. Choose another.' }]);
  }
}
