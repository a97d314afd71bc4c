// Form messages name their field and say what to type (an empty field is "required", not "'' is not a number").
import { describe, expect, it } from 'vitest';
import { fieldMessage } from '@/components/ui/field';
import { quantity } from '@/lib/validation/quantity';

describe('field messages', () => {
  it('puts the field name in front of the message, without the unit in brackets', () => {
    expect(fieldMessage('Plate resistor', 'required')).toBe('Plate resistor: required');
    expect(fieldMessage('Supply (B+)', 'must be greater than zero')).toBe('Supply: must be greater than zero');
    expect(fieldMessage('Designation', 'Designation is taken.')).toBe('Designation is taken.');
  });

  it('calls an empty numeric field required', () => {
    const ohms = quantity('Ω', { positive: true });
    expect(ohms.safeParse('').error!.issues[0]!.message).toBe('required');
    expect(ohms.safeParse('   ').error!.issues[0]!.message).toBe('required');
    expect(ohms.safeParse('4x7').error!.issues[0]!.message).toBe("'4x7' is not a number: use e.g. 4k7 or 4700");
  });
});
