import { moneyWords, percentWords } from '@shared/explanation';
import { formatInZone } from '@shared/time-zone';

/** The usual caution of a decision record, on the report's first page and its workbook's first sheet. */
export const CAUTION = 'Decision support only: this report records how the evaluation was carried out. The buyer’s procurement rules and local law govern the award; check it against them before relying on it.';

export const formatMoney = (amount: number, currency: string): string => moneyWords(amount, { currency, unit: '' });

const quantity = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 4 });
export const formatQuantity = (n: number): string => quantity.format(n);

export const percentText = (fraction: number): string => percentWords(fraction);

/** A stored instant in the tender's time zone (zone not repeated: the report names it once). */
export const dateTime = (iso: string | null, timeZone: string): string => (iso ? formatInZone(iso, timeZone, { named: false }) : '—');
