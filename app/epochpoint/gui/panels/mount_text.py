"""What the mount panel tells the observer: the confirmation before a slew or a sync (the exact
coordinates to be sent; before a slew, the safety caution, once) and the report after it. A
sync moves nothing, and its confirmation never says the mount is about to move."""
from __future__ import annotations


from ...core.limits import SOLAR_CAUTION
from ...io.angles import format_dec_dms, format_ra_hms
from ...mount import CAUTION
from ...mount.telescope import (DEFAULT_TRACK_S, FRAME_TEXT, J2000_COORD, command_place,
                                pier_side_comparison, side_words, sky_place)
from ..cautious_question import CautiousQuestion
from ..number_text import fixed


def sent_place(pointing, coordinate_property: str | None) -> tuple[float, float, str]:
    """(RA deg, Dec deg, frame text) that Telescope.command sends for this pointing (the
    model-corrected place when it has one)."""
    prop = J2000_COORD if coordinate_property == J2000_COORD else "EQUATORIAL_EOD_COORD"
    return (*command_place(pointing, prop), FRAME_TEXT[prop])


def _model_lines(pointing, coordinate_property: str | None) -> list[str]:
    """With a pointing model: the sky place the model corrects, and the axes it commands."""
    if pointing.command_eod_deg is None:
        return []
    prop = J2000_COORD if coordinate_property == J2000_COORD else "EQUATORIAL_EOD_COORD"
    ra_sky, dec_sky = sky_place(pointing, prop)
    return [f"These are corrected by the pointing model. Sky place of {pointing.name} "
            f"without it: RA {format_ra_hms(ra_sky, 2)}  Dec {format_dec_dms(dec_sky, 1)}; "
            f"the axes go to hour angle {fixed(pointing.axes_deg[0], 4, signed=True)}°, "
            f"declination {fixed(pointing.axes_deg[1], 4, signed=True)}°."]


def _pier_lines(pointing, device_pier_side: str) -> list[str]:
    """A German mount: the pier side a slew now takes beside what the device reports now."""
    side = getattr(pointing, "pier_side", "")  # any pointing-like object (mount.Pointing)
    if not side:
        return []
    device = (f"the device reports {device_pier_side} now, before the slew" if device_pier_side
              else "the device reports no pier side")
    return [f"Pier side: {side_words(side)} for {pointing.name} now; {device}. "
            f"The slew is refused if the {DEFAULT_TRACK_S / 60.0:g} min of tracking after it "
            "would pass the meridian limit (a flip mid-track)."]


def confirmation_text(pointing, sync: bool, device: str, coordinate_property: str | None,
                      sun_avoidance_deg: float, device_pier_side: str = "") -> str:
    """What the confirmation states: the exact numbers to be sent, the target now, for a slew
    on a German mount the pier side beside the device's (device_pier_side: its
    TELESCOPE_PIER_SIDE now), and for a slew the caution (mount.CAUTION, the one text the
    command line prints too)."""
    ra_deg, dec_deg, frame = sent_place(pointing, coordinate_property)
    what = (f"Sync {device} to {pointing.name}" if sync
            else f"Slew {device} to {pointing.name} and track it")
    lines = [
        what,
        "",
        f"Coordinates to send ({coordinate_property or 'EQUATORIAL_EOD_COORD'}, {frame}):",
        f"    RA   {format_ra_hms(ra_deg, 2)}   ({ra_deg / 15.0:.8f} h)",
        f"    Dec  {format_dec_dms(dec_deg, 1)}   ({fixed(dec_deg, 7, signed=True)}°)",
        *_model_lines(pointing, coordinate_property),
        f"{pointing.name} at {pointing.time}: altitude {fixed(pointing.alt_deg, 2)}°, azimuth "
        f"{fixed(pointing.az_deg, 2)}°, {pointing.sun_separation_deg:.1f}° from the Sun "
        f"(avoidance radius {sun_avoidance_deg:g}°).",
        *([] if sync else _pier_lines(pointing, device_pier_side)),
        "",
    ]
    if pointing.is_sun:  # the Sun passes the interlocks only with the solar option on
        lines += [SOLAR_CAUTION, ""]
    if sync:
        lines.append("A sync moves nothing: it tells the mount that it points at these "
                     "coordinates, and every later slew trusts that. Be sure the telescope is "
                     f"centred on {pointing.name}.")
    else:
        lines.append(CAUTION)
    return "\n".join(lines)


def report_text(report) -> str:
    """One paragraph on a finished slew or sync (mount.SlewReport)."""
    action = report.action.capitalize()
    if report.aborted:
        head = f"{action} of {report.target} stopped by ABORT (state {report.final_state})"
    else:
        head = f"{action} of {report.target} ended {report.final_state}"
    parts = [head]
    if report.residual_arcsec is not None:
        tolerance = ("within" if report.within_tolerance else "BEYOND") + \
            f" the tolerance of {report.tolerance_arcsec:g}″"
        residual = f"residual {report.residual_arcsec:.2f}″ from the target's place now"
        if report.refined:
            residual += f" after one refining slew (first {report.first_residual_arcsec:.2f}″)"
        parts.append(f"{residual}, {tolerance}")
    if report.reported_ra_deg is not None:
        parts.append(f"device reports RA {format_ra_hms(report.reported_ra_deg, 2)} Dec "
                     f"{format_dec_dms(report.reported_dec_deg, 1)}")
    pier = pier_side_comparison(report.pointing.pier_side, report.device_pier_side) \
        if report.action == "slew" and report.final_state is not None else ""
    return "; ".join(parts) + "." + (f" {pier}" if pier else "")


class ConfirmMotionDialog(CautiousQuestion):
    """The last question before anything is sent: accept sends, anything else sends nothing
    (Enter does not move the mount)."""

    def __init__(self, text: str, sync: bool, parent=None):
        super().__init__("Confirm sync" if sync else "Confirm slew", text,
                         "Sync" if sync else "Slew and track", "confirmText", 520, parent)
