"""Each numpy per-star step against the ERFA routine it reproduces (pyerfa, the reference
implementation of the IAU SOFA library).

Fixed inputs are those of SOFA's own test program t_sofa_c.c, quoted from memory; their
expected SOFA outputs (also from memory) are first checked against ERFA, so a slip of memory
shows up as a failure of that check and not as a false comparison. Random inputs follow.
"""
import erfa
import numpy as np
import pytest

import epochpoint as ep
from epochpoint.core.apparent import aberrate, deflect_by_sun
from epochpoint.core.context import SiteContext
from epochpoint.core.observed import observed_place
from epochpoint.core.refraction import density_factor, low_altitude_join_factor
from epochpoint.core.spacemotion import propagate
from star_samples import INSTANTS, NORTH_SITE, SOUTH_SITE, realistic_stars, separation_mas

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

MAS_PER_RAD = np.degrees(1.0) * 3.6e6
# Same formula, same order of operations: agreement to rounding (1e-12 rad = 0.2 uas).
ROUNDING_RAD = 1e-12


def _unit_rows(rng, n):
    v = rng.normal(size=(n, 3))
    return v / np.linalg.norm(v, axis=1, keepdims=True)


# ---- light deflection by the Sun: erfa.ldsun -------------------------------------------------

def test_ldsun_sofa_case():
    # t_sofa_c.c t_ldsun inputs and outputs (from memory).
    p = np.array([-0.763276255, -0.608633767, -0.216735543])
    e = np.array([-0.973644023, -0.20925523, -0.0907169552])
    em = 0.999809214
    sofa = np.array([-0.7632762580731413169, -0.6086337635262647900, -0.2167355419322321302])
    np.testing.assert_allclose(erfa.ldsun(p, e, em), sofa, atol=1e-12)
    ours = deflect_by_sun(p[:, None].copy(), e, em)[:, 0]
    np.testing.assert_allclose(ours, erfa.ldsun(p, e, em), atol=ROUNDING_RAD)


def test_ldsun_random():
    rng = np.random.default_rng(1)
    p = _unit_rows(rng, 500)
    e = _unit_rows(rng, 1)[0]
    for em in (0.983, 1.0, 1.017):
        ours = deflect_by_sun(p.T.copy(), e, em).T
        np.testing.assert_allclose(ours, erfa.ldsun(p, e, em), atol=ROUNDING_RAD)


# ---- annual aberration: erfa.ab ---------------------------------------------------------------

def test_ab_sofa_case():
    # t_sofa_c.c t_ab inputs and outputs (from memory).
    pnat = np.array([-0.76321968546737951, -0.60869453983060384, -0.21676408580639883])
    v = np.array([2.1044018893653786e-5, -8.9108923304429319e-5, -3.8633714797716569e-5])
    s, bm1 = 0.99980921395708788, 0.99999999506209258
    sofa = np.array([-0.7631631094219556269, -0.6087553082505590832, -0.2167926269368471279])
    np.testing.assert_allclose(erfa.ab(pnat, v, s, bm1), sofa, atol=1e-12)
    ours = aberrate(pnat[:, None].copy(), v, s, bm1)[:, 0]
    np.testing.assert_allclose(ours, erfa.ab(pnat, v, s, bm1), atol=ROUNDING_RAD)


def test_ab_random():
    rng = np.random.default_rng(2)
    p = _unit_rows(rng, 500)
    for _ in range(5):
        # Earth-like barycentric speeds, 29-31 km/s, in units of c.
        v = _unit_rows(rng, 1)[0] * rng.uniform(29.0, 31.0) / 299_792.458
        s = rng.uniform(0.983, 1.017)
        bm1 = np.sqrt(1.0 - v @ v)
        ours = aberrate(p.T.copy(), v, s, bm1).T
        np.testing.assert_allclose(ours, erfa.ab(p, v, s, bm1), atol=ROUNDING_RAD)


# ---- CIRS to observed: erfa.atioq -------------------------------------------------------------

def _site_context_from_astrom(astrom, site) -> SiteContext:
    """Our SiteContext filled from an ERFA eraASTROM (refraction constants included)."""
    refa, refb = float(astrom["refa"]), float(astrom["refb"])
    return SiteContext(site=site, eral=float(astrom["eral"]), xpl=float(astrom["xpl"]),
                       ypl=float(astrom["ypl"]), sin_lat=float(astrom["sphi"]),
                       cos_lat=float(astrom["cphi"]), diurnal_aberration=float(astrom["diurab"]),
                       refa=refa, refb=refb, refraction_join=low_altitude_join_factor(refa, refb),
                       refraction_horizon=density_factor(site.pressure, site.temperature),
                       last_rad=0.0)


def _compare_with_atioq(ri, di, astrom, site_ctx):
    """Differences (mas) between observed_place and erfa.atioq for CIRS ri, di (radians)."""
    aob, zob, hob, dob, _ = erfa.atioq(ri, di, astrom)
    p_cirs = np.stack((np.cos(di) * np.cos(ri), np.cos(di) * np.sin(ri), np.sin(di)))
    ours = observed_place(p_cirs, site_ctx)
    altaz = separation_mas(np.degrees(ours.az), np.degrees(ours.alt), np.degrees(aob),
                           90.0 - np.degrees(zob))
    hadec = separation_mas(np.degrees(ours.ha), np.degrees(ours.dec), np.degrees(hob),
                           np.degrees(dob))
    return altaz, hadec, 90.0 - np.degrees(zob)


def test_atioq_sofa_case():
    # t_sofa_c.c t_atioq: inputs to apio13 and atioq, and the expected outputs (from memory).
    astrom = erfa.apio13(2456384.5, 0.969254051, 0.1550675, -0.527800806, -1.2345856, 2738.0,
                         2.47230737e-7, 1.82640464e-6, 731.0, 12.8, 0.59, 0.55)
    ri, di = 2.710121572969038991, 0.1729371367218230438
    sofa = (0.9233952224895122499e-1, 1.407758704513549991, -0.9247619879881698140e-1,
            0.1717653435756234676, 2.710085107988480746)
    np.testing.assert_allclose(erfa.atioq(ri, di, astrom), sofa, atol=1e-12)
    # SOFA's star is at 9.3 deg altitude, below 15 deg where our refraction deliberately
    # leaves SOFA's model (refraction.py); compare there with refraction off on both sides.
    astrom["refa"] = astrom["refb"] = 0.0
    site = ep.Site(latitude=np.degrees(-1.2345856), longitude=np.degrees(-0.527800806),
                   height=2738.0, pressure=0.0)
    altaz, hadec, _ = _compare_with_atioq(np.array([ri]), np.array([di]), astrom,
                                          _site_context_from_astrom(astrom, site))
    assert altaz.max() < 1e-6 and hadec.max() < 1e-6, (altaz, hadec)


@pytest.mark.parametrize("when", INSTANTS)
@pytest.mark.parametrize("site_kw", [SOUTH_SITE, NORTH_SITE], ids=["south", "north"])
def test_atioq_random_with_refraction_above_15_deg(when, site_kw):
    # The engine's own site context (ERA, s', polar motion, weather) against erfa.apio with
    # the same constants and erfa.refco for the refraction constants.
    site = ep.Site(**site_kw, pressure=870.0, temperature=-2.0, humidity=0.7, wavelength=0.8)
    ctx = ep.make_context(when, site)
    refa, refb = erfa.refco(site.pressure, site.temperature, site.humidity, site.wavelength)
    xp, yp = ctx.polar_motion_rad
    astrom = erfa.apio(erfa.sp00(*ctx.tt), ctx.era_rad, np.radians(site.longitude),
                       np.radians(site.latitude), site.height, xp, yp, refa, refb)
    rng = np.random.default_rng(3)
    ri = rng.uniform(0.0, 2.0 * np.pi, 2000)
    di = np.arcsin(rng.uniform(-1.0, 1.0, 2000))
    altaz, hadec, _ = _compare_with_atioq(ri, di, astrom, ctx.site)
    # Select by the unrefracted altitude (atioq with refraction off): our refraction switches
    # models at 15 deg true altitude, which is observed altitude 15.0-15.06 deg.
    unrefracted = astrom.copy()
    unrefracted["refa"] = unrefracted["refb"] = 0.0
    high = 90.0 - np.degrees(erfa.atioq(ri, di, unrefracted)[1]) > 15.0
    assert high.sum() > 300
    # We rotate by exactly sin/cos(refraction) where atioq uses d and 1 - d^2/2: the two
    # differ by d^3/6, 0.03 mas at 15 deg altitude.
    assert altaz[high].max() < 0.05 and hadec[high].max() < 0.05, (
        f"worst {altaz[high].max():.2e} mas (alt/az), {hadec[high].max():.2e} mas (ha/dec)")


# ---- space motion: erfa.pmsafe ----------------------------------------------------------------

def _pmsafe(ra_deg, dec_deg, parallax_mas, pm_ra_cosdec, pm_dec, rv, epoch1, epoch2):
    """erfa.pmsafe in our units; returns ra, dec (deg), parallax (mas) at epoch2."""
    dec_rad = np.radians(dec_deg)
    pmr = pm_ra_cosdec / MAS_PER_RAD / np.cos(dec_rad)  # SOFA wants d(ra)/dt, not cos dec
    jd1 = erfa.epj2jd(epoch1)
    jd2 = erfa.epj2jd(epoch2)
    ra2, dec2, _, _, px2, _ = erfa.pmsafe(
        np.radians(ra_deg), dec_rad, pmr, pm_dec / MAS_PER_RAD, parallax_mas / 1000.0, rv,
        jd1[0], jd1[1], jd2[0], jd2[1])
    return np.degrees(ra2), np.degrees(dec2), px2 * 1000.0


def test_pmsafe_sofa_case():
    # t_sofa_c.c t_pmsafe (from memory): 8.75 years; a very fast star (~2000 km/s) but with a
    # small radial velocity, so SOFA's light-time terms nearly cancel.
    ra2, dec2, pmr2, pmd2, px2, rv2 = erfa.pmsafe(1.234, 0.789, 1e-5, -2e-5, 1e-2, 10.0,
                                                  2400000.5, 48348.5625, 2400000.5, 51544.5)
    np.testing.assert_allclose([ra2, dec2, pmr2, pmd2, px2],
                               [1.234087484501017061, 0.7888249982450468567,
                                0.9996457663586073988e-5, -0.2000040085106754565e-4,
                                0.9999997295356830666e-2], atol=1e-12)
    np.testing.assert_allclose(rv2, 10.38468380293920069, atol=1e-9)
    dt_years = (51544.5 - 48348.5625) / 365.25
    ours = propagate(np.array([np.degrees(1.234)]), np.array([np.degrees(0.789)]),
                     np.array([10.0]), np.array([1e-5 * np.cos(0.789) * MAS_PER_RAD]),
                     np.array([-2e-5 * MAS_PER_RAD]), np.array([10.0]), dt_years)
    ra_deg, dec_deg = ours.radec_deg()
    sep = separation_mas(ra_deg, dec_deg, np.degrees(ra2), np.degrees(dec2))
    assert sep.max() < 0.01, f"{sep.max():.2e} mas"
    np.testing.assert_allclose(ours.parallax, px2 * 1000.0, rtol=1e-6)
    np.testing.assert_allclose(ours.radial_velocity, rv2, atol=1e-3)


@pytest.mark.parametrize("years", [30.0, -30.0])
def test_pmsafe_realistic_stars_within_1_mas_over_30_years(years):
    s = realistic_stars(seed=4, n=400)
    ours = propagate(s["ra"], s["dec"], s["parallax"], s["pm_ra_cosdec"], s["pm_dec"],
                     s["radial_velocity"], years)
    ra_deg, dec_deg = ours.radec_deg()
    ra_ref, dec_ref, px_ref = _pmsafe(s["ra"], s["dec"], s["parallax"], s["pm_ra_cosdec"],
                                      s["pm_dec"], s["radial_velocity"], s["epoch"],
                                      s["epoch"] + years)
    sep = separation_mas(ra_deg, dec_deg, ra_ref, dec_ref)
    assert sep.max() <= 1.0, f"worst {sep.max():.4f} mas vs erfa.pmsafe"
    np.testing.assert_allclose(ours.parallax, px_ref, rtol=1e-5)


@pytest.mark.parametrize("site_kw", [SOUTH_SITE, NORTH_SITE], ids=["south", "north"])
def test_atioq_random_without_refraction_all_altitudes(site_kw):
    # Pressure 0 turns refraction off on both sides; then every altitude, also below the
    # horizon, follows atioq (Earth rotation, polar motion, diurnal aberration).
    site = ep.Site(**site_kw, pressure=0.0)
    ctx = ep.make_context(INSTANTS[1], site)
    xp, yp = ctx.polar_motion_rad
    astrom = erfa.apio(erfa.sp00(*ctx.tt), ctx.era_rad, np.radians(site.longitude),
                       np.radians(site.latitude), site.height, xp, yp, 0.0, 0.0)
    rng = np.random.default_rng(5)
    ri = rng.uniform(0.0, 2.0 * np.pi, 2000)
    di = np.arcsin(rng.uniform(-1.0, 1.0, 2000))
    altaz, hadec, _ = _compare_with_atioq(ri, di, astrom, ctx.site)
    assert altaz.max() < 1e-3 and hadec.max() < 1e-3, (altaz.max(), hadec.max())
