/**
 * Numbers from forms and JSON bodies: decimal notation only ("150", "150.5", "-2"), so that "0x96" (hex),
 * "1e3" or "Infinity" is refused with a message naming the field instead of being read as another number.
 */
import { z } from 'zod';

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)$/;

/** A finite number given as a JSON number or a decimal string; messages name `field`. */
export const decimal = (field: string) =>
  z.preprocess(
    (v) => (typeof v === 'string' && DECIMAL.test(v.trim()) ? Number(v.trim()) : v),
    z.number({ error: (i) => (i.input === undefined || i.input === '' ? `${field} is required` : `${field} must be a decimal number, like 150 or 150.5 (got ${JSON.stringify(i.input)})`) }),
  );

/** A decimal number in [min, max] of `unit`; out of range says "<field> must be between min and max unit". */
export const decimalIn = (field: string, min: number, max: number, unit: string, int = false) => {
  const msg = `${field} must be ${int ? 'whole, ' : ''}between ${min} and ${max} ${unit}`.trimEnd();
  const n = z.number({ error: (i) => (i.input === undefined || i.input === '' ? `${field} is required` : `${field} must be a decimal number ${msg.slice(field.length + ' must be '.length)} (got ${JSON.stringify(i.input)})`) }).min(min, msg).max(max, msg);
  return z.preprocess((v) => (typeof v === 'string' && DECIMAL.test(v.trim()) ? Number(v.trim()) : v), int ? n.int(msg) : n);
};
