import type XlsxPopulate from 'xlsx-populate';

/**
 * What an uploaded cell holds, sorted into the cases our messages distinguish. A formula is reported
 * as such and never evaluated: its cached result could be anything the sender's application wrote.
 */
export type CellReading =
  | { kind: 'blank' }
  | { kind: 'number'; value: number }
  | { kind: 'text'; text: string }
  | { kind: 'formula'; formula: string }
  | { kind: 'other'; description: string };

function hasMethod<K extends string>(value: object, name: K): value is Record<K, () => unknown> {
  return typeof (value as Record<string, unknown>)[name] === 'function';
}

export function readCell(cell: XlsxPopulate.Cell): CellReading {
  const formula = cell.formula();
  if (formula !== undefined && formula !== '') return { kind: 'formula', formula };

  const value = cell.value();
  if (value === undefined || value === null) return { kind: 'blank' };
  if (typeof value === 'number') {
    return Number.isFinite(value) ? { kind: 'number', value } : { kind: 'other', description: 'a value that is not a finite number' };
  }
  if (typeof value === 'string') return value.trim() === '' ? { kind: 'blank' } : { kind: 'text', text: value.trim() };
  if (typeof value === 'boolean') return { kind: 'other', description: `the logical value ${value ? 'TRUE' : 'FALSE'}` };
  if (value instanceof Date) return { kind: 'other', description: 'a date' };
  if (hasMethod(value, 'text')) {
    // Rich text: formatted runs of characters, still text.
    const text = String(value.text()).trim();
    return text === '' ? { kind: 'blank' } : { kind: 'text', text };
  }
  if (hasMethod(value, 'error')) return { kind: 'other', description: `the error value ${String(value.error())}` };
  return { kind: 'other', description: 'a value that is not a number' };
}

/** Shortens text quoted back in a message, so a pasted paragraph does not flood the error list. */
export function quoteForMessage(text: string, max = 40): string {
  const single = text.replace(/\s+/g, ' ');
  return `"${single.length > max ? `${single.slice(0, max - 1)}…` : single}"`;
}

/** "Unit price must be…" → "unit price must be…", for messages that start with a cell or row name. */
export function lowerFirst(message: string): string {
  return message.charAt(0).toLowerCase() + message.slice(1);
}
