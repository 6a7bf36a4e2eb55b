"""The ``[scenarios]`` section: which deviations exist and their load-time checks. The scenario runs
are :mod:`screen.runs.scenarios`.
"""

from __future__ import annotations

from screen.constants import ZERO_CELSIUS
from screen.errors import CaseError

#: Deviation keys of [scenarios], in table order, with their row labels.
DEVIATIONS = (
    ("double_charge", "double charge"),
    ("dosing_rate_factor", "dosing faster"),
    ("dosing_temperature", "dosing too cold"),
    ("agitation_loss", "agitation lost"),
    ("coolant_temperature", "wrong coolant"),
    ("decomposition_rate_factor", "contamination"),
)


def _selected(section) -> list[str]:
    """Deviation keys switched on in a [scenarios] section."""
    keys = []
    for key, _ in DEVIATIONS:
        value = section.get(key)
        if value is None or value is False:
            continue
        keys.append(key)
    return keys


def check_case(sections, vessels, path, warnings) -> None:
    """Cross-field checks of ``[scenarios]`` (called by :func:`screen.io.case.build_case`).

    Parameters
    ----------
    sections : dict of str to screen.io.case.Section
        Validated sections of the case by name (SI quantities).
    vessels : sequence of screen.io.case.Section
        Validated vessel sections.
    path : str
        Case file, for the error message.
    warnings : list of str
        Appended to when the section selects no deviation.

    Raises
    ------
    CaseError
        A deviation that the case cannot represent: dosing deviations or loss of agitation in a
        batch process, a dosing temperature not below T_p, dosing faster with a piecewise feed
        profile, a wrong coolant temperature without vessels, a contamination factor not above 1.
    """
    section = sections.get("scenarios")
    if section is None:
        return
    process = sections["process"]
    semi_batch = process.mode == "semi-batch"
    kinetics = sections.get("synthesis_kinetics")
    for key in ("dosing_rate_factor", "dosing_temperature", "agitation_loss"):
        if section.get(key) not in (None, False) and not semi_batch:
            raise CaseError(f"the {key.replace('_', ' ')} scenario needs a semi-batch process "
                            f"(process.mode = \"semi-batch\"); a batch has no dosing",
                            f"scenarios.{key}", path)
    if section.dosing_rate_factor is not None and kinetics is not None \
            and kinetics.feed_profile is not None:
        raise CaseError("dosing faster is applied to synthesis_kinetics.dosing_time; with a "
                        "piecewise feed_profile write the faster profile as its own case",
                        "scenarios.dosing_rate_factor", path)
    if section.dosing_temperature is not None \
            and section.dosing_temperature >= process.temperature:
        raise CaseError(f"dosing_temperature ({section.dosing_temperature - ZERO_CELSIUS:.1f} "
                        f"degC) must be below the process temperature "
                        f"({process.temperature - ZERO_CELSIUS:.1f} degC): the deviation is "
                        f"dosing into a too-cold mass", "scenarios.dosing_temperature", path)
    if section.coolant_temperature is not None and not vessels:
        raise CaseError("the wrong-coolant scenario needs at least one [vessel]",
                        "scenarios.coolant_temperature", path)
    if section.decomposition_rate_factor is not None and section.decomposition_rate_factor <= 1.0:
        raise CaseError(f"got {section.decomposition_rate_factor:g}; a contamination speeds up "
                        f"the decomposition: the factor must be above 1",
                        "scenarios.decomposition_rate_factor", path)
    if not _selected(section) and not section.evaporation_check:
        warnings.append("[scenarios] selects no deviation (all keys absent or false).")
