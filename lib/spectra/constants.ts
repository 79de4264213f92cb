/**
 * Physical constants, CODATA 2018 recommended values (exact where the 2019 SI fixes them).
 * Source: E. Tiesinga et al., "CODATA recommended values of the fundamental physical constants: 2018",
 * Rev. Mod. Phys. 93, 025010 (2021).
 */

/** Elementary charge e, C (exact). */
export const ELEMENTARY_CHARGE_C = 1.602176634e-19;
/** Planck constant h, J s (exact). */
export const PLANCK_J_S = 6.62607015e-34;
/** Reduced Planck constant ħ = h / 2π, J s. */
export const HBAR_J_S = PLANCK_J_S / (2 * Math.PI);
/** Electron mass m_e, kg (CODATA 2018, relative uncertainty 3.0e-10). */
export const ELECTRON_MASS_KG = 9.1093837015e-31;
/** Boltzmann constant k_B, eV/K (exact: 1.380649e-23 J/K divided by e). */
export const BOLTZMANN_EV_PER_K = 1.380649e-23 / ELEMENTARY_CHARGE_C;
/** Conductance quantum G₀ = 2e²/h, S (exact). */
export const CONDUCTANCE_QUANTUM_S = (2 * ELEMENTARY_CHARGE_C * ELEMENTARY_CHARGE_C) / PLANCK_J_S;

/** FWHM of the thermal kernel −∂f/∂E in units of k_B·T: 4·ln(1+√2) ≈ 3.5255. */
export const THERMAL_FWHM_PER_KT = 4 * Math.log(1 + Math.SQRT2);
/** FWHM of the first-harmonic lock-in kernel in units of the peak modulation: √3. */
export const LOCKIN_FWHM_PER_VPEAK = Math.sqrt(3);
