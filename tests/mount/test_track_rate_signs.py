"""The declination-axis rate sent for a body, on each side of the pier and in each hemisphere.

Reference: the mechanical angles of a German mount's declination axis (common practice, spelt
out in core/pointing_model/pier_sides.py's docstring; written here from the geometry, not read
from that module): the axis angle runs with the declination on one side of the pier and
against it on the other, and the roles swap when the polar axis points at the south pole. The
INDI telescope simulator (indi-bin 1.9.9) was measured to follow exactly that pattern (see
mount/telescope.py); the simulator tests in test_body_tracking.py follow a body from a
northern and a southern site.
"""
from __future__ import annotations

import pytest

from epochpoint.mount.pointing import Pointing
from epochpoint.mount.telescope import INDI_SIDEREAL_ARCSEC_S, track_rates


def _body(rate_ra: float, rate_dec: float, dec: float = 0.0) -> Pointing:
    return Pointing(name="b", time="2026-12-02T10:00:00Z", ra_apparent_deg=10.0,
                    dec_apparent_deg=dec, ra_j2000_deg=10.0, dec_j2000_deg=dec, alt_deg=50.0,
                    az_deg=100.0, ha_deg=-10.0, dec_observed_deg=dec, sun_separation_deg=90.0,
                    refusal="", rate_ra_arcsec_s=rate_ra, rate_dec_arcsec_s=rate_dec)


@pytest.mark.parametrize("pier_west, southern, sign", [(False, False, 1.0), (True, False, -1.0),
                                                       (False, True, -1.0), (True, True, 1.0)])
def test_declination_rate_turns_with_the_pier_side_and_the_hemisphere(pier_west, southern, sign):
    ra_axis, de_axis = track_rates(_body(0.5, 0.3), pier_west, southern)
    assert de_axis == pytest.approx(sign * 0.3)
    # The hour-angle axis turns with the sky less the body's own motion, whatever the side.
    assert ra_axis == pytest.approx(INDI_SIDEREAL_ARCSEC_S - 0.5)


def test_right_ascension_rate_is_divided_by_cos_dec():
    """rate_ra includes cos Dec (arcsec of great circle per second); the axis turns by
    rate_ra / cos Dec (common practice)."""
    ra_axis, _ = track_rates(_body(0.5, 0.0, dec=60.0))
    assert ra_axis == pytest.approx(INDI_SIDEREAL_ARCSEC_S - 1.0)
