import { describe, expect, it } from 'vitest';
import { currentMagnitudeWarning, plausibleCurrent } from '@/lib/curves/plausibility';

describe('plate current plausibility', () => {
  it('takes the cathode current rating, or the current that dissipates Pa(max) at 50 V', () => {
    expect(plausibleCurrent({ cathodeCurrent: 0.15, plateDissipation: 25 })).toBe(0.15);
    expect(plausibleCurrent({ plateDissipation: 1 })).toBeCloseTo(0.02, 9);
    expect(plausibleCurrent({})).toBeNull();
  });

  it('flags 30 A for a 1 W triode and accepts 5 mA', () => {
    expect(currentMagnitudeWarning([1.2, 30], 'A', '12AX7', { plateDissipation: 1 })).toMatch(/30 A .*implausible for a 12AX7.*milliamperes/);
    expect(currentMagnitudeWarning([0.0012, 0.005], 'mA', '12AX7', { plateDissipation: 1 })).toBeNull();
  });

  it('flags currents 1000 times too small, and says nothing without ratings', () => {
    expect(currentMagnitudeWarning([1e-6, 5e-7], 'mA', '6L6GC', { cathodeCurrent: 0.15 })).toMatch(/implausibly small.*amperes/);
    expect(currentMagnitudeWarning([30], 'A', 'X1', {})).toBeNull();
  });
});
