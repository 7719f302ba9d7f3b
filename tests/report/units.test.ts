import { describe, expect, it } from 'vitest';
import { csvLength, formatAngle, formatLength, formatPpm, fromMm, toMm } from '@/lib/report/units';

describe('display units', () => {
  // 1 in = 25.4 mm exactly (international yard and pound agreement, 1959).
  it('converts one inch to 25.4 mm and back', () => {
    expect(fromMm(25.4, 'in')).toBe(1);
    expect(toMm(1, 'in')).toBe(25.4);
    expect(fromMm(12.7, 'mm')).toBe(12.7);
  });

  it('shows 0.01 mm and 0.0001 in resolution with a real minus sign', () => {
    expect(formatLength(0.127, 'mm')).toBe('0.13 mm');
    // 0.127 mm / 25.4 = 0.005 in exactly
    expect(formatLength(0.127, 'in')).toBe('0.0050 in');
    expect(formatLength(-0.254, 'in', { signed: true })).toBe('−0.0100 in');
    expect(formatLength(0.5, 'mm', { signed: true })).toBe('+0.50 mm');
    expect(formatLength(-0.001, 'mm', { signed: true })).toBe('0.00 mm');
  });

  it('writes CSV lengths one place finer, blank when absent', () => {
    // 1.5875 mm = 1/16 in = 0.0625 in
    expect(csvLength(1.5875, 'in')).toBe('0.06250');
    expect(csvLength(1.5876, 'mm')).toBe('1.588');
    expect(csvLength(null, 'mm')).toBe('');
  });

  it('states scale as parts per million', () => {
    expect(formatPpm(1.0003)).toBe('+300 ppm');
    expect(formatPpm(0.99995)).toBe('−50 ppm');
    expect(formatPpm(1)).toBe('0 ppm');
  });

  it('states scale with its 1σ in the same parts per million', () => {
    // 1σ 6e-5 is 60 parts per million
    expect(formatPpm(1.0003, 6e-5)).toBe('+300 ± 60 ppm');
    expect(formatPpm(0.99995, null)).toBe('−50 ppm');
  });

  // ISO 80000-3: a plane angle in degrees is written with the degree sign straight after the number
  it('writes an angle to 0.001° with its degree sign, and its ± with the degree sign too', () => {
    expect(formatAngle(0.0123456)).toBe('0.012°');
    expect(formatAngle(-0.0126, { signed: true })).toBe('−0.013°');
    expect(formatAngle(0.0126, { signed: true })).toBe('+0.013°');
    // a turn that rounds to nothing carries no sign
    expect(formatAngle(-0.0004, { signed: true })).toBe('0.000°');
    expect(formatAngle(0.0123, { signed: true, sigmaDeg: 0.0009 })).toBe('+0.012° ± 0.001°');
    expect(formatAngle(0.5, { sigmaDeg: null })).toBe('0.500°');
    // an uncertainty below the resolution is said to be below it, not zero
    expect(formatAngle(-2.95, { sigmaDeg: 0.0002 })).toBe('−2.950° ± < 0.001°');
    // under a column heading that names the degree
    expect(formatAngle(-0.25, { signed: true, suffix: false })).toBe('−0.250');
  });
});
