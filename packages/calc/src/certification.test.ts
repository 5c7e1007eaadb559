import { describe, expect, it } from 'vitest';
import { certificationSatisfies, requiredCertificationFor } from './certification';

describe('certificationSatisfies', () => {
  it('Universal satisfies any; a type satisfies only itself; nothing needed always passes', () => {
    for (const needs of ['I', 'II', 'III', 'universal'] as const) expect(certificationSatisfies('universal', needs)).toBe(true);
    expect(certificationSatisfies('II', 'II')).toBe(true);
    expect(certificationSatisfies('II', 'III')).toBe(false);
    expect(certificationSatisfies('I', 'universal')).toBe(false);
    expect(certificationSatisfies('none', 'I')).toBe(false);
    expect(certificationSatisfies('none', undefined)).toBe(true);
    expect(certificationSatisfies('none', null)).toBe(true);
  });
});

describe('requiredCertificationFor', () => {
  it('maps appliance classes to EPA 608 types (from memory)', () => {
    expect(requiredCertificationFor({ refrigerantWork: false })).toBeNull();
    expect(requiredCertificationFor({})).toBe('II');
    expect(requiredCertificationFor({ applianceType: 'small' })).toBe('I');
    expect(requiredCertificationFor({ applianceType: 'low_pressure' })).toBe('III');
    expect(requiredCertificationFor({ factorySealed: true, fullChargeLb: 5 })).toBe('I');
    expect(requiredCertificationFor({ factorySealed: true, fullChargeLb: 6 })).toBe('II');
  });
});
