import { describe, expect, it } from 'vitest';
import {
  formatInterval,
  formatTyped,
  intervalFromHours,
  intervalToHours,
  rateFromPerHour,
  rateToPerHour,
  readTypedNumber,
} from './units';

describe('rate units', () => {
  // 1 FIT = 1e-9 per hour (IEC 61508-4 usage, common practice); relative tolerance 1e-12.
  it('converts FIT to per hour and back', () => {
    expect(rateToPerHour(250, 'fit')).toBeCloseTo(2.5e-7, 18);
    expect(rateFromPerHour(2.5e-7, 'fit')).toBeCloseTo(250, 9);
  });

  // A year of 8760 h (common practice, the hours per year of IEC 61508-6 Annex B examples).
  it('converts per year to per hour and back', () => {
    expect(rateToPerHour(0.0876, 'perYear')).toBeCloseTo(1e-5, 15);
    expect(rateFromPerHour(1e-5, 'perYear')).toBeCloseTo(0.0876, 12);
  });

  it('keeps per hour as it is', () => {
    expect(rateToPerHour(3e-6, 'perHour')).toBe(3e-6);
  });
});

describe('interval units', () => {
  // 8760 h per year, 730 h per month (common practice); exact in binary for these values.
  it('converts months and years to hours and back', () => {
    expect(intervalToHours(12, 'months')).toBe(8760);
    expect(intervalToHours(2, 'years')).toBe(17520);
    expect(intervalFromHours(4380, 'months')).toBe(6);
    expect(intervalFromHours(8760, 'years')).toBe(1);
  });
});

describe('reading typed numbers', () => {
  it('reads plain, scientific and decimal-comma input', () => {
    expect(readTypedNumber('2.5e-7')).toBe(2.5e-7);
    expect(readTypedNumber(' 3,5 ')).toBe(3.5);
    expect(readTypedNumber('1E3')).toBe(1000);
  });

  it('tells an empty field from text that is not a number', () => {
    expect(readTypedNumber('')).toBeNull();
    expect(readTypedNumber('abc')).toBeNaN();
    expect(readTypedNumber('1e')).toBeNaN();
    expect(readTypedNumber('1.2.3')).toBeNaN();
  });
});

describe('formatting', () => {
  it('writes small rates in scientific notation and ordinary values plainly', () => {
    expect(formatTyped(2.5e-7)).toBe('2.5e-7');
    expect(formatTyped(8760)).toBe('8760');
    expect(formatTyped(0.05)).toBe('0.05');
  });

  it('writes intervals in the unit that reads naturally', () => {
    expect(formatInterval(8760)).toBe('1 y');
    expect(formatInterval(4380)).toBe('6 mo');
    expect(formatInterval(8)).toBe('8 h');
  });
});
