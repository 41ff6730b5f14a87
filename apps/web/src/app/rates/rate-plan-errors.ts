import { FormArray, FormGroup, type AbstractControl } from '@angular/forms';
import { errorText } from '../shared/form-paths';
import { describePath } from './rate-plan-form';

const FIELD_WORDS: Record<string, string> = {
  name: 'name',
  currency: 'currency',
  fromMonth: 'from month',
  toMonth: 'to month',
  offPeakPrice: 'off-peak price',
  facilityDemandCharge: 'facility demand charge',
  price: 'price',
  demandCharge: 'demand charge',
  dayTypes: 'days',
  from: 'from',
  to: 'to',
  amount: 'amount',
  per: 'per',
  seasons: 'seasons',
  fixedCharges: 'fixed charges',
  holidays: 'holidays',
  energyBlocks: 'energy blocks',
  uptoKwh: 'block end',
  adder: 'price change',
  percent: 'ratchet percentage',
  months: 'ratchet months',
};

/** Every control with an error, deepest first in document order, as `{ path, message }`. */
export function collectErrors(control: AbstractControl, path = ''): { path: string; message: string }[] {
  const out: { path: string; message: string }[] = [];
  if (control instanceof FormGroup || control instanceof FormArray) {
    const entries =
      control instanceof FormArray
        ? control.controls.map((c, i) => [`[${i}]`, c] as const)
        : Object.entries(control.controls);
    for (const [key, child] of entries) {
      const childPath = key.startsWith('[') ? `${path}${key}` : path ? `${path}.${key}` : key;
      out.push(...collectErrors(child, childPath));
    }
  }
  if (control.errors) out.push({ path, message: errorText(control) });
  return out;
}

/** "Season 1, period 2, window 1, to" for a field path. */
export function where(path: string): string {
  const clean = path.replace(/^definition\./, '');
  const last = /([A-Za-z]+)$/.exec(clean)?.[1] ?? '';
  const words = [describePath(clean), FIELD_WORDS[last] ?? ''].filter(Boolean).join(', ') || clean || 'Plan';
  return words.charAt(0).toUpperCase() + words.slice(1);
}
