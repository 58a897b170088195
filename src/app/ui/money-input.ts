import { Directive, forwardRef } from '@angular/core';
import { NG_VALUE_ACCESSOR, NumberValueAccessor } from '@angular/forms';

/**
 * A number input holding money: shows at least two decimals (58.40, not 58.4) when figures are
 * filled in (a saved bid, an uploaded workbook) and when the person leaves the field. Only the
 * display changes; the form value stays the same number, and typing is never reformatted. Angular
 * prefers this accessor to its built-in number one on inputs that carry `appMoney`.
 */
@Directive({
  selector: 'input[type=number][appMoney]',
  providers: [{ provide: NG_VALUE_ACCESSOR, useExisting: forwardRef(() => MoneyInput), multi: true }],
  host: { '(blur)': 'showCents($any($event.target))' },
})
export class MoneyInput extends NumberValueAccessor {
  override writeValue(value: number | null): void {
    this.setProperty('value', typeof value === 'number' ? withCents(value) : '');
  }

  protected showCents(input: HTMLInputElement): void {
    // Text the browser could not read as a number (valueAsNumber NaN) is left as it stands.
    if (input.value !== '' && Number.isFinite(input.valueAsNumber)) input.value = withCents(input.valueAsNumber);
  }
}

/** 58.4 → "58.40", 12 → "12.00", 3.1416 → "3.1416" (more decimals are kept as they are). */
export function withCents(value: number): string {
  const text = String(value);
  if (!Number.isFinite(value) || /e/i.test(text)) return text;
  const decimals = text.includes('.') ? text.split('.')[1].length : 0;
  return decimals >= 2 ? text : value.toFixed(2);
}
