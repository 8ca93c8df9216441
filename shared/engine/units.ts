// Physical constants and unit conversions. Inside the engine lengths are kpc,
// speeds km/s, masses Msun, so time is measured in kpc/(km/s) and
// accelerations in (km/s)^2/kpc. Users see Myr; conversions live only here.

/** CODATA 2018 Newtonian constant of gravitation, m^3 kg^-1 s^-2. */
export const G_SI = 6.6743e-11;
/** IAU 2015 Resolution B3 nominal solar mass parameter (GM)sun, m^3 s^-2. */
export const GM_SUN_NOMINAL_SI = 1.3271244e20;
/** IAU 2012 Resolution B2 astronomical unit (exact), m. */
export const AU_M = 149_597_870_700;
/** IAU 2015 Resolution B2: one parsec is 648000/pi au. */
export const PARSEC_M = (648_000 / Math.PI) * AU_M;
export const KPC_M = 1000 * PARSEC_M;
/** Solar mass implied by the two constants above, kg. */
export const SOLAR_MASS_KG = GM_SUN_NOMINAL_SI / G_SI;
/** G in kpc (km/s)^2 / Msun, derived rather than typed in (about 4.30091e-6). */
export const G = (G_SI * SOLAR_MASS_KG) / KPC_M / 1e6;

/** Julian year (IAU), s. */
export const JULIAN_YEAR_S = 365.25 * 86_400;
/** One internal time unit, kpc/(km/s), expressed in Myr (about 977.79). */
export const TIME_UNIT_MYR = KPC_M / 1e3 / (1e6 * JULIAN_YEAR_S);
/** One internal acceleration unit, (km/s)^2/kpc, expressed in m/s^2. */
export const ACCEL_UNIT_M_S2 = 1e6 / KPC_M;
/** Speed of light (exact, SI definition), km/s. */
export const C_KM_S = 299_792.458;

export const myrToInternal = (t_Myr: number): number => t_Myr / TIME_UNIT_MYR;
export const internalToMyr = (t: number): number => t * TIME_UNIT_MYR;
export const accelFromSI = (a_m_s2: number): number => a_m_s2 / ACCEL_UNIT_M_S2;
