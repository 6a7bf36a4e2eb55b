"""The unmitigated adiabatic course after a cooling failure, as a curve of the screening result.

The engine puts an :class:`AdiabaticCourse` into ``result.curves["adiabatic_course"]``; the
integration runs on first use (the PDF figure), so a ``check`` without a report does not pay for
it. Presenters read the arrays and compute nothing.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Any

import numpy as np


@dataclass(frozen=True)
class AdiabaticCourse:
    """Temperature against time of the mass from MTSR on, adiabatic (phi = 1), without cooling,
    boiling or relief: the unmitigated course.

    Attributes
    ----------
    kinetics : DecompositionKinetics
        The decomposition kinetics of the screening.
    start_temperature : float
        MTSR, the temperature at which the course starts. [K]
    specific_heat : float
        Specific heat capacity c'p of the mass. [J/(kg K)]

    Notes
    -----
    Integrated by :func:`screen.models.decomposition.adiabatic_course` (c'p dT/dt = q(T, a),
    Townsend & Tou, Thermochim. Acta 37 (1980) 1-30, for the zero-order case). Accessing a
    figure raises the model's ScreenError if the integration fails.
    """

    kinetics: Any
    start_temperature: float
    specific_heat: float

    @functools.cached_property
    def _arrays(self) -> tuple[np.ndarray, np.ndarray, float | None]:
        from screen.models.decomposition import adiabatic_course

        time, temperature = adiabatic_course(self.kinetics, self.start_temperature,
                                             self.specific_heat)
        time = np.asarray(time, dtype=float)
        temperature = np.asarray(temperature, dtype=float)
        moment = None
        if len(time) > 2:
            with np.errstate(all="ignore"):
                rate = np.gradient(temperature, time)
            finite = np.isfinite(rate)
            if finite.any():
                moment = float(time[int(np.nanargmax(np.where(finite, rate, -np.inf)))])
        return time, temperature, moment

    @property
    def time_s(self) -> np.ndarray:
        """Time since the cooling failure, from 0. [s]"""
        return self._arrays[0]

    @property
    def temperature_K(self) -> np.ndarray:  # noqa: N802 - unit in the name
        """Temperature of the mass. [K]"""
        return self._arrays[1]

    @property
    def time_to_maximum_rate_s(self) -> float | None:
        """Moment of the steepest rise on the course (None for fewer than 3 points). [s]"""
        return self._arrays[2]
