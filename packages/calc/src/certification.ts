/**
 * EPA Section 608 technician certification (40 CFR 82.161 — section number from memory, see
 * docs/reference/TRADE-FACTS.md): Type I small appliances, Type II high-pressure appliances (most
 * commercial comfort cooling and refrigeration), Type III low-pressure appliances (some chillers),
 * Universal all three.
 */

/** A technician's EPA 608 certification. */
export type Epa608Level = 'none' | 'I' | 'II' | 'III' | 'universal';
/** A certification a job can require. */
export type Epa608Requirement = 'I' | 'II' | 'III' | 'universal';

export const epa608Levels = ['none', 'I', 'II', 'III', 'universal'] as const;

/** True when a technician holding `has` may do work needing `needs` (Universal satisfies any). */
export function certificationSatisfies(has: Epa608Level, needs: Epa608Requirement | null | undefined): boolean {
  if (needs === null || needs === undefined) return true;
  if (has === 'universal') return true;
  if (needs === 'universal') return false;
  return has === needs;
}

/** Appliance class for EPA 608 purposes. */
export type Epa608ApplianceType = 'small' | 'high_pressure' | 'low_pressure';

export interface RefrigerantWork {
  /** Does the job open the refrigerant circuit (recover, charge, repair a leak)? Default true. */
  refrigerantWork?: boolean;
  /** Explicit appliance class; wins over the hints below. */
  applianceType?: Epa608ApplianceType;
  /** Factory-sealed appliance with 5 lb or less of refrigerant → small appliance (from memory). */
  factorySealed?: boolean;
  fullChargeLb?: number;
}

/**
 * The EPA 608 type a job's refrigerant work needs, or null when no refrigerant work is done.
 * Defaults to Type II: every refrigerant Coilpath lists is a high-pressure refrigerant, so only a
 * factory-sealed appliance of 5 lb or less (Type I) or an explicit low-pressure appliance (Type III)
 * differ. The 5 lb small-appliance limit is from memory, not checked against the CFR.
 */
export function requiredCertificationFor(work: RefrigerantWork): Epa608Requirement | null {
  if (work.refrigerantWork === false) return null;
  if (work.applianceType === 'small') return 'I';
  if (work.applianceType === 'low_pressure') return 'III';
  if (work.applianceType === 'high_pressure') return 'II';
  if (work.factorySealed && work.fullChargeLb !== undefined && work.fullChargeLb <= 5) return 'I';
  return 'II';
}
