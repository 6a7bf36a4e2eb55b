"""Load-time cross-field checks of the evaporative-cooling barrier inputs (``[solvent]``, vessel
condenser and vapour-line keys). The barrier itself is :mod:`screen.analyses.barrier`.
"""

from __future__ import annotations

from screen.errors import CaseError


def check_case(sections, vessels, path, warnings) -> None:
    """Cross-field checks of the barrier inputs (called by :func:`screen.io.case.build_case`).

    Parameters
    ----------
    sections : dict of str to screen.io.case.Section
        Validated sections (SI values).
    vessels : sequence of screen.io.case.Section
        Validated vessels.
    path : str
        Case file, for the error message.
    warnings : list of str
        Appended to (not used at present).

    Raises
    ------
    CaseError
        A condenser given both as a duty and as U A, a U A without its coolant temperature (or
        the reverse), an unknown solvent name, or more solvent than reaction mass at the failure.
    """
    multiple = len(vessels) > 1
    for index, vessel in enumerate(vessels, start=1):
        prefix = f"vessel.{index}" if multiple else "vessel"
        if vessel.condenser_duty is not None and vessel.condenser_ua is not None:
            raise CaseError("give the condenser capacity either as condenser_duty or as "
                            "condenser_ua with condenser_coolant_temperature, not both",
                            f"{prefix}.condenser_ua", path)
        if vessel.condenser_ua is not None and vessel.condenser_coolant_temperature is None:
            raise CaseError("condenser_ua needs condenser_coolant_temperature (mean coolant "
                            "temperature of the condenser), e.g. \"20 degC\"",
                            f"{prefix}.condenser_coolant_temperature", path)
        if vessel.condenser_coolant_temperature is not None and vessel.condenser_ua is None:
            raise CaseError("condenser_coolant_temperature is used only with condenser_ua; add "
                            "condenser_ua or remove it", f"{prefix}.condenser_coolant_temperature",
                            path)
    solvent = sections.get("solvent")
    if solvent is None:
        return
    if solvent.name is not None:
        from screen.models import solvents

        try:
            solvents.lookup_solvent(solvent.name, key="solvent.name")
        except CaseError as exc:
            raise CaseError(exc.message, exc.key or "solvent.name", path) from None
    if solvent.amount is not None:
        process = sections["process"]
        total = float(sections["mass"].amount)
        ratio = 1.0
        if process.mode == "semi-batch" and process.accumulation_mass_ratio is not None:
            ratio = float(process.accumulation_mass_ratio)
        if solvent.amount >= total * ratio:
            raise CaseError(
                f"solvent.amount ({solvent.amount:.4g} kg) is not below the reaction mass present "
                f"at the failure ({total * ratio:.4g} kg = mass.amount x accumulation_mass_ratio); "
                f"the solvent is part of the reaction mass", "solvent.amount", path)
