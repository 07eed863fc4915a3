//! Every number this crate takes from outside the project, with its source.
//!
//! The long coefficient tables of the lunar theory live beside the code that sums them
//! (`ephemeris.rs`, Meeus tables 47.A and 47.B); everything else is here.

/// Julian date of the J2000.0 epoch (2000 January 1, 12h TT). IAU 1976 definition.
pub const JD_J2000: f64 = 2_451_545.0;
/// Days per Julian century.
pub const DAYS_PER_JULIAN_CENTURY: f64 = 36_525.0;

/// IAU mean radius of the Moon, km (Archinal et al. 2018, Celest. Mech. Dyn. Astron. 130:22).
pub const MOON_RADIUS_KM: f64 = terrain::MOON_RADIUS_M / 1000.0;
/// Earth equatorial radius, km (WGS 84, NIMA TR8350.2). The equatorial radius is the largest
/// the Earth can present, so the upper limb it gives is conservative.
pub const EARTH_EQUATORIAL_RADIUS_KM: f64 = 6378.137;

/// Inclination of the mean lunar equator to the ecliptic, degrees (Meeus 1998, ch. 53, "I").
pub const LUNAR_EQUATOR_INCLINATION_DEG: f64 = 1.54242;

/// Mean obliquity of the ecliptic at J2000, arcseconds, and its rate terms (Meeus 1998,
/// eq. 22.2, from Lieske et al. 1977 / IAU 1976): eps = e0 + e1 T + e2 T^2 + e3 T^3.
pub const OBLIQUITY_J2000_ARCSEC: [f64; 4] = [84_381.448, -46.8150, -0.00059, 0.001813];

/// IAU 1976 precession angles from J2000 to an epoch t Julian centuries later, arcseconds
/// (Lieske et al. 1977, A&A 58:1; Meeus 1998, eq. 21.3 with T = 0): coefficients of t, t^2, t^3.
pub const PRECESSION_ZETA_ARCSEC: [f64; 3] = [2306.2181, 0.30188, 0.017998];
pub const PRECESSION_Z_ARCSEC: [f64; 3] = [2306.2181, 1.09468, 0.018203];
pub const PRECESSION_THETA_ARCSEC: [f64; 3] = [2004.3109, -0.42665, -0.041833];

/// North galactic pole and the galactic longitude of the north celestial pole in the J2000
/// (ICRS) frame, degrees: the IAU 1958 galactic system (Blaauw et al. 1960, MNRAS 121:123)
/// carried to J2000 as in the Hipparcos catalogue (ESA 1997, SP-1200, vol. 1, sec. 1.5.3).
pub const GALACTIC_POLE_RA_DEG: f64 = 192.85948;
pub const GALACTIC_POLE_DEC_DEG: f64 = 27.12825;
pub const GALACTIC_NCP_LON_DEG: f64 = 122.93192;

/// Mean length of the sidereal month, days (Meeus 1998, ch. 49 table; from memory).
pub const SIDEREAL_MONTH_DAYS: f64 = 27.321_661;
/// Period of the regression of the lunar nodes, days: 360 deg / 0.0529921 deg/day, the E1 rate
/// of the IAU rotation model below (Archinal et al. 2011) = 6793.5 days = 18.60 years.
pub const NODAL_PERIOD_DAYS: f64 = 360.0 / 0.052_992_1;

/// The IAU rotation model of the Moon (Archinal et al. 2011, Celest. Mech. Dyn. Astron.
/// 109:101, table 2; unchanged in Archinal et al. 2018). d = days from J2000 TDB,
/// T = Julian centuries. Angles E1..E13 = base + rate * d, degrees.
///
/// Every coefficient below (E1..E13, alpha0, delta0, W) was checked term by term against
/// NAIF's text kernel pck00010.tpc, which transcribes that table (its E rates are per
/// century: rate * 36525); the printed table itself from memory. Outside check of the whole
/// model: `tests/fixtures/lunarsky_reference.json` (JPL DE421 MOON_ME frame), which it
/// matches to 0.004 deg in the galactic centre's lunar declination over a nodal cycle.
pub const IAU_MOON_E: [(f64, f64); 13] = [
    (125.045, -0.052_992_1),
    (250.089, -0.105_984_2),
    (260.008, 13.012_000_9),
    (176.625, 13.340_715_4),
    (357.529, 0.985_600_3),
    (311.589, 26.405_708_4),
    (134.963, 13.064_993_0),
    (276.617, 0.328_714_6),
    (34.226, 1.748_487_7),
    (15.134, -0.158_976_3),
    (119.743, 0.003_609_6),
    (239.961, 0.164_357_3),
    (25.053, 12.959_008_8),
];
/// Pole right ascension: a0 + a1 T + sum(coef_i * sin E_i), degrees.
pub const IAU_MOON_RA0_DEG: [f64; 2] = [269.9949, 0.0031];
pub const IAU_MOON_RA_SIN: [f64; 13] = [
    -3.8787, -0.1204, 0.0700, -0.0172, 0.0, 0.0072, 0.0, 0.0, 0.0, -0.0052, 0.0, 0.0, 0.0043,
];
/// Pole declination: d0 + d1 T + sum(coef_i * cos E_i), degrees.
pub const IAU_MOON_DEC0_DEG: [f64; 2] = [66.5392, 0.0130];
pub const IAU_MOON_DEC_COS: [f64; 13] = [
    1.5419, 0.0239, -0.0278, 0.0068, 0.0, -0.0029, 0.0009, 0.0, 0.0, 0.0008, 0.0, 0.0, -0.0009,
];
/// Prime meridian: w0 + w1 d + w2 d^2 + sum(coef_i * sin E_i), degrees.
pub const IAU_MOON_W_DEG: [f64; 3] = [38.3213, 13.176_358_15, -1.4e-12];
pub const IAU_MOON_W_SIN: [f64; 13] = [
    3.5610, 0.1208, -0.0642, 0.0158, 0.0252, -0.0066, -0.0047, -0.0046, 0.0028, 0.0052, 0.0040,
    0.0019, -0.0044,
];

/// Speed of light, m/s (exact, SI).
pub const SPEED_OF_LIGHT_M_S: f64 = 299_792_458.0;
/// The far-field power pattern of a uniformly illuminated circular aperture is the Airy
/// pattern [2 J1(u)/u]^2, u = pi D sin(theta) / lambda (Airy 1835; Born & Wolf, Principles of
/// Optics, sec. 8.5.2). It falls to one half at u = 1.616340 (from memory; reproduced with
/// scipy 1.17.1, `tests/fixtures/record_beam_fixture.py`), which makes the half-power width
/// 1.0290 lambda/D: the "1.02 lambda/D" of antenna handbooks is this figure rounded.
pub const AIRY_HALF_POWER_U: f64 = 1.616_340;
/// First zero of J1: the Airy pattern's first null, at sin(theta) = 1.21967 lambda/D
/// (Abramowitz & Stegun 1964, table 9.5, from memory; reproduced with scipy's `jn_zeros`).
pub const J1_FIRST_ZERO: f64 = 3.831_706;

/// Half-width of the far-side band used for radio quiet: within this of the 180 meridian
/// (common practice, no source).
pub const FAR_SIDE_BAND_HALF_WIDTH_DEG: f64 = 45.0;

/// First zeros of the Airy function Ai (soft boundary) and of Ai' (hard boundary), negated:
/// they set the decay of the first creeping-wave mode (Abramowitz & Stegun 1964, table 10.13).
pub const AIRY_AI_FIRST_ZERO: f64 = 2.338_107;
pub const AIRY_AI_PRIME_FIRST_ZERO: f64 = 1.018_793;
