import { describe, expect, it } from 'vitest';
import { hasRightToLeft, visualOrder } from '../../../templates/pdf/bidi';

/*
 * Expected orders follow the Unicode Bidirectional Algorithm (UAX #9: the first strong character sets the
 * paragraph direction, neutrals between two runs of one direction take it, rule L2 reverses right-to-left
 * stretches) — from memory, at the granularity of runs, with each run's own text kept in logical order
 * because fontkit lays out each Hebrew or Arabic run right to left itself.
 */
const runs = (...texts: string[]) => texts.map((text) => ({ text }));
const order = (...texts: string[]) => visualOrder(runs(...texts)).map((r) => r.text);

describe('visualOrder', () => {
  it('leaves a line without right-to-left text alone', () => {
    expect(order('Travel', ' ', 'kettle', ' ', '1.7L')).toEqual(['Travel', ' ', 'kettle', ' ', '1.7L']);
    expect(hasRightToLeft('Чайник · Ηλεκτρικός')).toBe(false);
  });

  it('draws a Hebrew line right to left, keeping a number in its own order', () => {
    expect(hasRightToLeft('קומקום חשמלי 1.7 ליטר')).toBe(true);
    expect(order('קומקום', ' ', 'חשמלי', ' ', '1.7', ' ', 'ליטר')).toEqual([
      'ליטר',
      ' ',
      '1.7',
      ' ',
      'חשמלי',
      ' ',
      'קומקום',
    ]);
  });

  it('reverses an Arabic phrase inside a left-to-right line, not the line', () => {
    expect(order('Travel', ' ', 'kettle', ' ', 'غلاية', ' ', 'كهربائية', ' ', '1.7L')).toEqual([
      'Travel',
      ' ',
      'kettle',
      ' ',
      'كهربائية',
      ' ',
      'غلاية',
      ' ',
      '1.7L',
    ]);
  });

  it('keeps a Latin phrase in order inside a right-to-left line', () => {
    expect(order('קומקום', ' ', 'Ridge', ' ', 'Pro', ' ', 'חשמלי')).toEqual([
      'חשמלי',
      ' ',
      'Ridge',
      ' ',
      'Pro',
      ' ',
      'קומקום',
    ]);
  });
});
