"""Physical and unit constants used by the engine, each named with its unit.

Values are the IAU 2012 / IERS 2010 conventional constants as used by SOFA/ERFA.
"""
import math

DEG_TO_RAD = math.pi / 180.0
RAD_TO_DEG = 180.0 / math.pi
ARCSEC_TO_RAD = DEG_TO_RAD / 3600.0
RAD_TO_ARCSEC = 1.0 / ARCSEC_TO_RAD
MAS_TO_RAD = ARCSEC_TO_RAD / 1000.0
RAD_TO_MAS = 1.0 / MAS_TO_RAD

# Astronomical unit (IAU 2012 Resolution B2), metres.
AU_M = 149_597_870_700.0
# Speed of light, metres per second (exact).
C_M_PER_S = 299_792_458.0
# Speed of light in AU per day.
C_AU_PER_DAY = C_M_PER_S * 86400.0 / AU_M
# Schwarzschild radius of the Sun in AU (2 G M_sun / c^2), as SOFA's SRS.
SUN_SCHWARZSCHILD_AU = 1.97412574336e-8

DAYS_PER_JULIAN_YEAR = 365.25
SECONDS_PER_DAY = 86400.0
# J2000.0 as a Julian date (TT).
JD_J2000 = 2451545.0

# One AU per Julian year expressed in km/s: converts (parallax in mas) x (radial
# velocity in km/s) to the radial proper motion in mas/yr (Hipparcos Vol. 1, sec. 1.2.8).
AU_KM_PER_S_YEAR = AU_M / 1000.0 / (DAYS_PER_JULIAN_YEAR * SECONDS_PER_DAY)
