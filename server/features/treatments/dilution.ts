/**
 * Reconstitution arithmetic for a neuromodulator vial: the units in the vial and the saline added set the
 * concentration (FACTS 28: 100 U in 2.5 mL = 40 U/mL = 4 U per 0.1 mL). Plain arithmetic on the line's own product:
 * units of one product are not another's, so nothing here converts between products. Dependency-free (the
 * treatment screen shows the same figures live).
 */

/** The smallest and largest diluent volumes accepted per vial, mL (a typing guard, not a recommendation). */
export const DILUENT_ML = { min: 0.1, max: 10 } as const;

/** Units per mL after adding `diluentMl` of saline to a vial of `vialUnits`. */
export function unitsPerMl(vialUnits: number, diluentMl: number): number {
  if (!(vialUnits > 0) || !(diluentMl > 0)) throw new RangeError('Vial units and diluent volume must be above zero.');
  return vialUnits / diluentMl;
}

/** Units in each 0.1 mL, the figure read off an insulin-type syringe's markings, rounded to 0.01 U. */
export function unitsPerTenthMl(vialUnits: number, diluentMl: number): number {
  return Math.round(unitsPerMl(vialUnits, diluentMl) * 10) / 100;
}

/** The volume drawn up for `units` at that concentration, mL, rounded to 0.001 mL. */
export function volumeForUnits(units: number, vialUnits: number, diluentMl: number): number {
  return Math.round((units / unitsPerMl(vialUnits, diluentMl)) * 1000) / 1000;
}
