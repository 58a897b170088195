import { z } from 'zod';

/**
 * Rules for text people type, used by every request schema. Control characters never belong in
 * a name, code or e-mail address: a NUL cannot even be stored by PostgreSQL, and the others are
 * invisible on screen and in letters. Multi-line fields (descriptions, justifications, comments)
 * may hold line breaks and tabs, nothing else from the control range.
 */

/** C0 controls (NUL…US), DEL and C1 controls. */
// eslint-disable-next-line no-control-regex -- finding control characters is this pattern's purpose
const ANY_CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
/** The same, less tab, line feed and carriage return. */
// eslint-disable-next-line no-control-regex -- finding control characters is this pattern's purpose
const CONTROL_EXCEPT_LINES = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

/** True when `text` holds a control character a single-line field must not (any of them). */
export function hasControlCharacter(text: string, multiline = false): boolean {
  return (multiline ? CONTROL_EXCEPT_LINES : ANY_CONTROL).test(text);
}

/** The message every schema gives for such a character, naming the field. */
export function controlCharacterMessage(label: string, multiline = false): string {
  return multiline
    ? `${label} must not contain control characters (only line breaks and tabs are allowed).`
    : `${label} must not contain control characters such as line breaks, tabs or NUL.`;
}

/**
 * `schema` (a string schema) with control characters refused, the issue naming `label`. Give it
 * the untrimmed string schema: the check sees what was sent.
 */
export function plainText<S extends z.ZodType<string>>(schema: S, label: string, multiline = false) {
  return schema.refine((text) => !hasControlCharacter(text, multiline), { error: controlCharacterMessage(label, multiline) });
}
