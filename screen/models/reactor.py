"""Cooling-failure simulation of a jacketed, well-mixed batch or semi-batch reactor.

The desired reaction is A + B -> P. A is charged; B may be charged and/or dosed (semi-batch). The
module integrates the mass, species and energy balances during normal operation, then continues
adiabatically from any failure time ``t_f`` (cooling lost, feed stopped or continuing), and scans
``t_f`` for the worst case.

Balances (derived from the conservation laws for one liquid phase with constant density ``rho``
and constant specific heat ``c'p``, feed included; the same structure as in Hugo & Steinbach,
Chem. Eng. Sci. 41 (1986) 1081 and Steensma & Westerterp, Chem. Eng. Sci. 43 (1988) 2125,
notation from memory)::

    dm/dt    = mdot_feed(t)
    dn_A/dt  = -r V
    dn_B/dt  = ndot_B,feed(t) - r V
    m c'p dT/dt = mdot_feed c'p (T_D - T) + (-dH_r) r V + m q_dec(T, a) - UA_eff (T - T_c)
    da/dt    = q_dec(T, a) (1 - a0) / Q_dec

with ``V = m / rho``, the rate per volume ``r = k(T) c_A c_B`` (second order) or ``r = k(T) c_X``
(first order in X = A or B), and ``k(T) = k_inf exp(-E / (R T))``. The temperature equation follows
from d(m c'p T)/dt = mdot c'p T_D + heat flows, with constant c'p. The feed-rate profile is
piecewise constant; the integration is split at every change of the feed rate (the end of dosing
included), so the stiff solver never steps across a discontinuity.

Design simplifications (ours): the feed has the c'p and density of the reaction mass; ``q_dec`` is
per kg of the mass present and the decomposition conversion is not diluted by fresh feed (the feed
is taken to carry the same decomposition potential); ``UA_eff`` is constant unless a fill exponent
is given (:class:`Cooling`).

Accumulation and MTSR (Stoessel, Chem. Eng. Prog. 89(10) (1993) 68-75; Stoessel, Thermal Safety
of Chemical Processes, Wiley-VCH 2008, ch. 2 and 7)::

    n_acc(t) = min(n_A(t), n_B(t))        extent still possible with what is present
    X_ac(t)  = n_acc(t) / xi_total,        xi_total = min(n_A0, n_B0 + n_B,feed)
    MTSR(t)  = T(t) + n_acc(t) (-dH_r) / (m(t) c'p)    heat goes into the mass present at t

In the usual case (B dosed, A in excess, no B charged) X_ac is the unreacted B present over the
total B, the standard thermal accumulation. The mass correction is derived: with
``dT_ad,final = xi_total (-dH_r) / (m_final c'p)``, ``MTSR = T + X_ac dT_ad,final m_final / m(t)``.

Design choices (ours, not published) are marked "design" in the docstrings.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any, Protocol, runtime_checkable

import numpy as np

from screen.constants import GAS_CONSTANT, SECONDS_PER_HOUR
from screen.errors import ModelDomainError, SolverError
from screen.models.domain import require_finite, require_non_negative, require_positive

__all__ = [
    "SynthesisKinetics",
    "ReactorCharge",
    "Feed",
    "Cooling",
    "DecompositionHeatSource",
    "NormalOperation",
    "HeatRates",
    "MtsrProfile",
    "FailureContinuation",
    "ContinuationScan",
    "WorstCaseScan",
    "DosingWarning",
    "DosingAssessment",
    "simulate_normal_operation",
    "mtsr_profile",
    "failure_continuation",
    "worst_case_scan",
    "dosing_warnings",
]

_SCHEMES = ("first-order", "second-order")

# Index of each state variable in the integrated vector.
_MASS, _MOLES_A, _MOLES_B, _TEMPERATURE, _DECOMPOSITION, _DECOMPOSITION_HEAT = range(6)
_STATE_SIZE = 6








# --------------------------------------------------------------------------------------------
# Inputs
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class SynthesisKinetics:
    """Kinetics of the desired reaction A + B -> P.

    Rate per volume of reaction mass, with ``V = m / rho`` (``rho`` from :class:`ReactorCharge`)::

        second order:  r = k(T) c_A c_B = k(T) n_A n_B / V**2      [mol/(m^3 s)]
        first order:   r = k(T) c_X     = k(T) n_X / V             [mol/(m^3 s)], X = A or B
        k(T) = k_inf exp(-E / (R T))                               (Arrhenius)

    Parameters
    ----------
    scheme : {"first-order", "second-order"}
        Rate law. Second order is first order in A and in B.
    pre_exponential_factor : float
        k_inf. [1/s] for first order; [m^3/(mol s)] for second order.
    activation_energy : float
        E. [J/mol]
    molar_enthalpy : float
        Reaction enthalpy per mol of A converted; negative for an exothermic reaction. [J/mol]
    first_order_reagent : {"A", "B"}
        Reagent whose concentration sets a first-order rate (ignored for second order). The other
        reagent must be present in stoichiometric excess at all times (checked by
        :func:`simulate_normal_operation`). For a single-reactant A -> P, charge B at least equal to
        A; it then only counts the extent.
    """

    scheme: str
    pre_exponential_factor: float
    activation_energy: float
    molar_enthalpy: float
    first_order_reagent: str = "A"

    def __post_init__(self):
        if self.scheme not in _SCHEMES:
            raise ModelDomainError(
                f"scheme must be one of {_SCHEMES}, got {self.scheme!r}", key="scheme"
            )
        if self.first_order_reagent not in ("A", "B"):
            raise ModelDomainError(
                f"first_order_reagent must be 'A' or 'B', got {self.first_order_reagent!r}",
                key="first_order_reagent",
            )
        require_positive(self.pre_exponential_factor, "pre_exponential_factor")
        require_non_negative(self.activation_energy, "activation_energy")
        enthalpy = require_finite(self.molar_enthalpy, "molar_enthalpy")
        if enthalpy >= 0.0:
            # A sign slip would silently remove the heat source: fail closed.
            raise ModelDomainError(
                "molar_enthalpy must be negative (exothermic reaction, J/mol), got "
                f"{self.molar_enthalpy!r}",
                key="molar_enthalpy",
            )

    @classmethod
    def from_rate_constant(
        cls,
        scheme: str,
        rate_constant: float,
        reference_temperature: float,
        activation_energy: float,
        molar_enthalpy: float,
        first_order_reagent: str = "A",
    ) -> SynthesisKinetics:
        """Build the kinetics from a rate constant measured at a reference temperature.

        ``k_inf = k_ref exp(E / (R T_ref))`` (Arrhenius).

        Parameters
        ----------
        scheme : {"first-order", "second-order"}
            Rate law. [text]
        rate_constant : float
            k at the reference temperature. [1/s] or [m^3/(mol s)]
        reference_temperature : float
            Temperature of ``rate_constant``. [K]
        activation_energy : float
            E. [J/mol]
        molar_enthalpy : float
            Reaction enthalpy, negative when exothermic. [J/mol]
        first_order_reagent : {"A", "B"}
            See the class documentation. [text]

        Returns
        -------
        SynthesisKinetics
            Kinetics with the equivalent pre-exponential factor. [object]

        Examples
        --------
        k = 1e-3 1/s at 300 K and E = 50 kJ/mol; by hand, at 310 K
        k = 1e-3 exp(E/R (1/300 - 1/310)) = 1e-3 exp(6013.618 * 1.075269e-4)
          = 1e-3 exp(0.646626) = 1.90909e-3 1/s.

        >>> kinetics = SynthesisKinetics.from_rate_constant(
        ...     "first-order", 1e-3, 300.0, 50e3, -100e3)
        >>> round(kinetics.rate_constant(310.0) * 1e3, 5)
        1.90909
        >>> round(kinetics.rate_constant(300.0) * 1e3, 9)
        1.0
        """
        k_ref = require_positive(rate_constant, "rate_constant")
        t_ref = require_positive(reference_temperature, "reference_temperature")
        energy = require_non_negative(activation_energy, "activation_energy")
        exponent = energy / (GAS_CONSTANT * t_ref)
        if exponent > 700.0:
            raise ModelDomainError(
                f"E/(R T_ref) = {exponent:.4g} overflows; check activation_energy and "
                "reference_temperature",
                key="activation_energy",
            )
        return cls(
            scheme=scheme,
            pre_exponential_factor=k_ref * math.exp(exponent),
            activation_energy=energy,
            molar_enthalpy=molar_enthalpy,
            first_order_reagent=first_order_reagent,
        )

    def rate_constant(self, temperature):
        """Arrhenius rate constant ``k(T) = k_inf exp(-E / (R T))``.

        Parameters
        ----------
        temperature : float or array_like
            Temperature. [K]

        Returns
        -------
        float or numpy.ndarray
            k. [1/s] or [m^3/(mol s)]
        """
        temperature = np.asarray(temperature, dtype=float)
        if np.any(~np.isfinite(temperature)) or np.any(temperature <= 0.0):
            raise ModelDomainError("temperature must be finite and > 0 K", key="temperature")
        value = self.pre_exponential_factor * np.exp(
            -self.activation_energy / (GAS_CONSTANT * temperature)
        )
        return float(value) if value.ndim == 0 else value


@dataclass(frozen=True)
class ReactorCharge:
    """Initial contents of the vessel.

    Parameters
    ----------
    initial_mass : float
        Mass charged before dosing. [kg]
    initial_moles_a : float
        A charged. [mol]
    initial_moles_b : float
        B charged (0 for a classic semi-batch). [mol]
    initial_temperature : float
        Temperature at t = 0, also the process temperature unless stated otherwise. [K]
    specific_heat : float
        c'p of the reaction mass and of the feed (taken equal and constant). [J/(kg K)]
    density : float
        Density of the reaction mass and of the feed (constant; volume V = m / rho). [kg/m^3]
    """

    initial_mass: float
    initial_moles_a: float
    initial_moles_b: float
    initial_temperature: float
    specific_heat: float
    density: float

    def __post_init__(self):
        require_positive(self.initial_mass, "initial_mass")
        require_non_negative(self.initial_moles_a, "initial_moles_a")
        require_non_negative(self.initial_moles_b, "initial_moles_b")
        require_positive(self.initial_temperature, "initial_temperature")
        require_positive(self.specific_heat, "specific_heat")
        require_positive(self.density, "density")


@dataclass(frozen=True)
class Feed:
    """Dosing of B (semi-batch).

    Either a constant rate over ``dosing_time`` from ``start_time``, or a piecewise-constant profile
    of ``(start_s, end_s, fraction)`` pieces whose fractions of the total sum to 1. Within a piece
    the mass and molar feed rates are ``fraction * mass / (end - start)`` and
    ``fraction * moles_b / (end - start)``; overlapping pieces add.

    Parameters
    ----------
    moles_b : float
        Total B dosed. [mol]
    mass : float
        Total mass of the feed (B and any solvent). [kg]
    feed_temperature : float
        Temperature of the feed T_D. [K]
    dosing_time : float, optional
        Duration of a constant-rate dosing. [s]
    profile : sequence of (float, float, float), optional
        Pieces ``(start [s], end [s], fraction [-])``; give this or ``dosing_time``.
    start_time : float
        Start of a constant-rate dosing (ignored with ``profile``). [s]
    """

    moles_b: float
    mass: float
    feed_temperature: float
    dosing_time: float | None = None
    profile: Sequence[tuple[float, float, float]] | None = None
    start_time: float = 0.0

    def __post_init__(self):
        require_non_negative(self.moles_b, "feed.moles_b")
        require_non_negative(self.mass, "feed.mass")
        require_positive(self.feed_temperature, "feed.feed_temperature")
        if self.mass == 0.0 and self.moles_b > 0.0:
            raise ModelDomainError("a feed with moles of B needs a mass > 0", key="feed.mass")
        if (self.dosing_time is None) == (self.profile is None):
            raise ModelDomainError(
                "give exactly one of dosing_time and profile", key="feed.dosing_time"
            )
        pieces = self._build_pieces()
        object.__setattr__(self, "profile", pieces)
        object.__setattr__(
            self, "dosing_time", None if self.dosing_time is None else float(self.dosing_time)
        )

    def _build_pieces(self) -> tuple[tuple[float, float, float], ...]:
        if self.dosing_time is not None:
            duration = require_positive(self.dosing_time, "feed.dosing_time")
            start = require_non_negative(self.start_time, "feed.start_time")
            return ((start, start + duration, 1.0),)
        pieces = []
        try:
            raw = [tuple(piece) for piece in self.profile]
        except TypeError as exc:
            raise ModelDomainError(
                "profile must be a list of (start_s, end_s, fraction)", key="feed.profile"
            ) from exc
        if not raw:
            raise ModelDomainError("profile is empty", key="feed.profile")
        for index, piece in enumerate(raw):
            if len(piece) != 3:
                raise ModelDomainError(
                    f"profile piece {index} must be (start_s, end_s, fraction), got {piece!r}",
                    key="feed.profile",
                )
            start = require_non_negative(piece[0], f"feed.profile[{index}].start")
            end = require_finite(piece[1], f"feed.profile[{index}].end")
            fraction = require_non_negative(piece[2], f"feed.profile[{index}].fraction")
            if end <= start:
                raise ModelDomainError(
                    f"profile piece {index}: end {end!r} must be after start {start!r}",
                    key="feed.profile",
                )
            pieces.append((start, end, fraction))
        total = sum(piece[2] for piece in pieces)
        if abs(total - 1.0) > 1e-9:
            raise ModelDomainError(
                f"profile fractions must sum to 1, got {total!r}", key="feed.profile"
            )
        return tuple(sorted(pieces))

    @property
    def end_time(self) -> float:
        """End of the dosing (latest piece end). [s]"""
        return max(piece[1] for piece in self.profile)

    @property
    def begin_time(self) -> float:
        """Start of the dosing (earliest piece start). [s]"""
        return min(piece[0] for piece in self.profile)

    @property
    def breakpoints(self) -> tuple[float, ...]:
        """Times at which the feed rate changes. [s]"""
        return tuple(sorted({t for piece in self.profile for t in piece[:2]}))

    def fraction_rate(self, time: float) -> float:
        """Fraction of the total fed per second at ``time`` (right-continuous).

        Parameters
        ----------
        time : float
            Time. [s]

        Returns
        -------
        float
            Sum of ``fraction / (end - start)`` over the pieces running at ``time``. [1/s]

        Examples
        --------
        Constant dosing over 2 h from t = 0: 1/7200 s = 1.3889e-4 1/s while it runs; a quarter
        is in after 1800 s (1800/7200 = 0.25).

        >>> feed = Feed(moles_b=10.0, mass=1.0, feed_temperature=298.15, dosing_time=7200.0)
        >>> round(feed.fraction_rate(100.0) * 1e4, 4), feed.fraction_rate(7200.0)
        (1.3889, 0)
        >>> feed.dosed_fraction(1800.0)
        0.25
        """
        return sum(
            fraction / (end - start) for start, end, fraction in self.profile if start <= time < end
        )

    def dosed_fraction(self, time):
        """Fraction of the total dosed up to ``time``. [-]

        Parameters
        ----------
        time : float or array_like
            Time. [s]

        Returns
        -------
        float or numpy.ndarray
            Dosed fraction, 0..1. [-]
        """
        time = np.asarray(time, dtype=float)
        total = np.zeros_like(time)
        for start, end, fraction in self.profile:
            total = total + fraction * np.clip((time - start) / (end - start), 0.0, 1.0)
        return float(total) if total.ndim == 0 else total

    @property
    def is_empty(self) -> bool:
        """True when the feed adds nothing (a batch run)."""
        return self.mass == 0.0 and self.moles_b == 0.0


@dataclass(frozen=True)
class Cooling:
    """Jacket cooling ``UA_eff (T - T_c)``.

    ``UA_eff = ua (m / m_final) ** fill_exponent`` (design): exponent 0 (default) keeps UA constant;
    2/3 scales the wetted area like the surface of geometrically similar volumes; 1 makes it
    proportional to the fill height of a cylindrical shell. ``ua`` is the value at the final mass.

    Parameters
    ----------
    ua : float
        Overall heat-transfer coefficient times area at the final fill. [W/K]
    coolant_temperature : float
        Jacket (coolant) temperature T_c. [K]
    fill_exponent : float
        Exponent of the fill scaling, 0..1. [-]
    """

    ua: float
    coolant_temperature: float
    fill_exponent: float = 0.0

    def __post_init__(self):
        require_non_negative(self.ua, "cooling.ua")
        require_positive(self.coolant_temperature, "cooling.coolant_temperature")
        exponent = require_non_negative(self.fill_exponent, "cooling.fill_exponent")
        if exponent > 1.0:
            raise ModelDomainError(
                f"fill_exponent must be within 0..1, got {self.fill_exponent!r}",
                key="cooling.fill_exponent",
            )


@runtime_checkable
class DecompositionHeatSource(Protocol):
    """What the reactor model needs from a decomposition model (duck typing).

    ``heat_release_rate(temperature [K], conversion [-])`` returns the specific heat release rate
    [W/kg of reaction mass]; ``energy`` is the heat the decomposition still releases from
    ``initial_conversion`` to completion [J/kg]; ``initial_conversion`` [-] is its conversion at
    t = 0. The conversion therefore advances as ``da/dt = q (1 - a0) / Q``.
    """

    energy: float
    initial_conversion: float

    def heat_release_rate(self, temperature: float, conversion: float | None = None) -> float:
        """Specific heat release rate of the decomposition.

        Parameters
        ----------
        temperature : float
            Temperature of the mass. [K]
        conversion : float or None
            Decomposition conversion a; ``None`` means the initial conversion. [-]

        Returns
        -------
        float
            q_dec per kg of reaction mass. [W/kg]
        """
        ...


def _check_decomposition(decomposition) -> tuple[float, float]:
    if not callable(getattr(decomposition, "heat_release_rate", None)):
        raise ModelDomainError(
            "decomposition needs a heat_release_rate(temperature, conversion) method",
            key="decomposition",
        )
    energy = require_positive(getattr(decomposition, "energy", None), "decomposition.energy")
    initial = require_non_negative(getattr(decomposition, "initial_conversion", None),
                                   "decomposition.initial_conversion")
    if initial >= 1.0:
        raise ModelDomainError(
            f"decomposition.initial_conversion must be < 1, got {initial!r}",
            key="decomposition.initial_conversion",
        )
    return energy, initial


# --------------------------------------------------------------------------------------------
# Right-hand side and piecewise integration
# --------------------------------------------------------------------------------------------


class _Balances:
    """Plain-float parameters and the right-hand side of the balances (fast scalar code)."""

    def __init__(self, kinetics, charge, cooling, feed, decomposition):
        self.kinetics = kinetics
        self.charge = charge
        self.cooling = cooling
        self.feed = feed
        self.decomposition = decomposition
        self.pre_exponential = kinetics.pre_exponential_factor
        self.activation_temperature = kinetics.activation_energy / GAS_CONSTANT
        self.heat_of_reaction = -kinetics.molar_enthalpy  # > 0
        self.second_order = kinetics.scheme == "second-order"
        self.first_order_index = _MOLES_A if kinetics.first_order_reagent == "A" else _MOLES_B
        self.specific_heat = charge.specific_heat
        self.density = charge.density
        self.coolant_temperature = cooling.coolant_temperature
        self.fill_exponent = cooling.fill_exponent
        feed_mass = 0.0 if feed is None else feed.mass
        self.final_mass = charge.initial_mass + feed_mass
        self.feed_temperature = (
            charge.initial_temperature if feed is None else feed.feed_temperature
        )
        if decomposition is not None:
            energy, initial = _check_decomposition(decomposition)
            self.decomposition_scale = (1.0 - initial) / energy
            self.decomposition_rate = decomposition.heat_release_rate
        else:
            self.decomposition_scale = 0.0
            self.decomposition_rate = None
        feed_moles = 0.0 if feed is None else feed.moles_b
        # Scales for the absolute tolerances.
        self.mole_scale = max(charge.initial_moles_a, charge.initial_moles_b + feed_moles)
        self.decomposition_energy = 0.0 if decomposition is None else float(decomposition.energy)

    def effective_ua(self, ua, mass):
        if ua == 0.0 or self.fill_exponent == 0.0:
            return ua
        return ua * (mass / self.final_mass) ** self.fill_exponent

    def make_rhs(self, mass_rate: float, molar_rate: float, ua: float) -> Callable:
        """Right-hand side for a segment with constant feed rates and cooling ``ua``.

        Scalar float code with everything bound to locals: the stiff solver calls it thousands of
        times per continuation, so attribute look-ups and numpy scalars are avoided here.
        """
        exp = math.exp
        pre_exponential = self.pre_exponential
        activation_temperature = self.activation_temperature
        density = self.density
        second_order = self.second_order
        first_order_in_a = self.first_order_index == _MOLES_A
        decomposition = self.decomposition_rate
        heat_of_reaction = self.heat_of_reaction
        specific_heat = self.specific_heat
        feed_term = mass_rate * specific_heat
        feed_temperature = self.feed_temperature
        coolant = self.coolant_temperature
        scale = self.decomposition_scale
        fill_exponent = self.fill_exponent if ua > 0.0 else 0.0
        final_mass = self.final_mass

        def rhs(_time, state):
            mass, moles_a, moles_b, temperature, conversion, _ = state
            if not temperature > 0.0:
                raise SolverError(f"temperature left the physical domain ({temperature} K)")
            k = pre_exponential * exp(-activation_temperature / temperature)
            if moles_a < 0.0:
                moles_a = 0.0
            if moles_b < 0.0:
                moles_b = 0.0
            if second_order:
                rate = k * moles_a * moles_b * density / mass
            else:
                rate = k * (moles_a if first_order_in_a else moles_b)
            if decomposition is None:
                specific_q = 0.0
            else:
                specific_q = float(
                    decomposition(temperature, 0.0 if conversion < 0.0 else min(conversion, 1.0))
                )
            ua_now = ua if fill_exponent == 0.0 else ua * (mass / final_mass) ** fill_exponent
            heat_flow = (
                feed_term * (feed_temperature - temperature)
                + heat_of_reaction * rate
                + mass * specific_q
                - ua_now * (temperature - coolant)
            )
            return (
                mass_rate,
                -rate,
                molar_rate - rate,
                heat_flow / (mass * specific_heat),
                specific_q * scale,
                mass * specific_q,
            )

        return rhs

    def specific_decomposition_vector(self, temperature, conversion):
        """q_dec at arrays of states [W/kg]; falls back to a loop for scalar-only models."""
        if self.decomposition_rate is None:
            return np.zeros_like(temperature)
        conversion = np.clip(conversion, 0.0, 1.0)
        try:
            values = np.asarray(self.decomposition_rate(temperature, conversion), dtype=float)
            if values.shape == temperature.shape:
                return values
        except (TypeError, ValueError):
            pass
        return np.array(
            [float(self.decomposition_rate(t, a)) for t, a in zip(temperature, conversion)]
        )

    def heat_flows(self, states, mass_rate, molar_rate, ua):
        """Heat flows [W] and dT/dt [K/s] at an array of states (columns), vectorised.

        Returns (reaction, decomposition, cooling, feed_sensible, temperature_rate).
        """
        mass = states[_MASS]
        temperature = states[_TEMPERATURE]
        moles_a = np.maximum(states[_MOLES_A], 0.0)
        moles_b = np.maximum(states[_MOLES_B], 0.0)
        k = self.pre_exponential * np.exp(-self.activation_temperature / temperature)
        if self.second_order:
            rate = k * moles_a * moles_b * self.density / mass
        else:
            rate = k * (moles_a if self.first_order_index == _MOLES_A else moles_b)
        reaction = self.heat_of_reaction * rate
        decomposition = mass * self.specific_decomposition_vector(
            temperature, states[_DECOMPOSITION]
        )
        if ua == 0.0 or self.fill_exponent == 0.0:
            ua_now = ua
        else:
            ua_now = ua * (mass / self.final_mass) ** self.fill_exponent
        cooling = ua_now * (temperature - self.coolant_temperature)
        sensible = mass_rate * self.specific_heat * (self.feed_temperature - temperature)
        temperature_rate = (sensible + reaction + decomposition - cooling) / (
            mass * self.specific_heat
        )
        return reaction, decomposition, cooling, sensible, temperature_rate

    def feed_rates(self, time: float, feed_on: bool) -> tuple[float, float]:
        """(mass rate [kg/s], molar rate of B [mol/s]) in the segment starting at ``time``."""
        if self.feed is None or not feed_on:
            return 0.0, 0.0
        fraction_rate = self.feed.fraction_rate(time)
        return fraction_rate * self.feed.mass, fraction_rate * self.feed.moles_b


class _PiecewiseTrajectory:
    """Dense output glued from the per-segment solutions of solve_ivp."""

    def __init__(self, balances, segments):
        # segments: list of (start, end, dense solution, step times, step states, feed/ua rates)
        self.balances = balances
        self.starts = np.array([segment[0] for segment in segments], dtype=float)
        self.ends = np.array([segment[1] for segment in segments], dtype=float)
        self.solutions = [segment[2] for segment in segments]
        self.step_times = [segment[3] for segment in segments]
        self.step_states = [segment[4] for segment in segments]
        self.rates = [segment[5] for segment in segments]  # (mass rate, molar rate, ua)

    @property
    def t_min(self) -> float:
        return float(self.starts[0])

    @property
    def t_max(self) -> float:
        return float(self.ends[-1])

    def segment_index(self, times: np.ndarray) -> np.ndarray:
        index = np.searchsorted(self.ends, times, side="left")
        return np.minimum(index, len(self.ends) - 1)

    def __call__(self, times) -> np.ndarray:
        times = np.asarray(times, dtype=float)
        if times.ndim == 0:
            time = float(times)
            if len(self.ends) == 1:
                segment = 0
            else:
                segment = int(self.segment_index(np.array([time]))[0])
            self._check_range(time, time)
            return self.solutions[segment](min(max(time, self.t_min), self.t_max))
        flat = np.ravel(times)
        if flat.size:
            self._check_range(float(flat.min()), float(flat.max()))
        flat = np.clip(flat, self.t_min, self.t_max)
        out = np.empty((_STATE_SIZE, flat.size))
        index = self.segment_index(flat)
        for segment in np.unique(index):
            mask = index == segment
            out[:, mask] = self.solutions[segment](flat[mask])
        return out

    def _check_range(self, lowest: float, highest: float) -> None:
        tolerance = 1e-12 * max(self.t_max - self.t_min, 1.0)
        if lowest < self.t_min - tolerance or highest > self.t_max + tolerance:
            raise ModelDomainError(
                f"time outside the simulated interval [{self.t_min}, {self.t_max}] s",
                key="time",
            )

    def heat_flows(self, times) -> tuple[np.ndarray, ...]:
        """Heat flows and dT/dt at ``times`` (right-continuous in the feed rate)."""
        times = np.atleast_1d(np.asarray(times, dtype=float))
        states = self(times)
        # right-continuous: a time on a breakpoint belongs to the segment that starts there
        index = np.searchsorted(self.ends, times, side="right")
        index = np.minimum(index, len(self.ends) - 1)
        flows = [np.empty(times.size) for _ in range(5)]
        mass_rates = np.empty(times.size)
        for segment in np.unique(index):
            mask = index == segment
            mass_rate, molar_rate, ua = self.rates[segment]
            values = self.balances.heat_flows(states[:, mask], mass_rate, molar_rate, ua)
            for target, value in zip(flows, values):
                target[mask] = value
            mass_rates[mask] = mass_rate
        return (*flows, mass_rates, states)

    def step_temperature_rates(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(times, states, dT/dt) at the solver steps, each step evaluated in its own segment."""
        times, states, rates = [], [], []
        for segment, (step_t, step_y) in enumerate(zip(self.step_times, self.step_states)):
            mass_rate, molar_rate, ua = self.rates[segment]
            rates.append(self.balances.heat_flows(step_y, mass_rate, molar_rate, ua)[4])
            times.append(step_t)
            states.append(step_y)
        return np.concatenate(times), np.concatenate(states, axis=1), np.concatenate(rates)

    def temperature_rate(self, time: float) -> float:
        """dT/dt at one time (segment containing it, left one on a breakpoint). [K/s]"""
        segment = int(self.segment_index(np.array([time]))[0])
        mass_rate, molar_rate, ua = self.rates[segment]
        state = self(time).reshape(_STATE_SIZE, 1)
        return float(self.balances.heat_flows(state, mass_rate, molar_rate, ua)[4][0])

    def all_step_times(self) -> np.ndarray:
        return np.unique(np.concatenate(self.step_times))


#: Right-hand-side evaluations allowed per integration segment before giving up (design; a
#: normal segment needs a few thousand). Keeps a pathological case from running for minutes.
MAX_RHS_EVALUATIONS = 60_000


class _BudgetExceeded(Exception):
    pass


def _with_budget(rhs):
    calls = [0]

    def counted(t, y):
        calls[0] += 1
        if calls[0] > MAX_RHS_EVALUATIONS:
            raise _BudgetExceeded
        return rhs(t, y)

    return counted


def _integrate(
    balances: _Balances,
    initial_state: np.ndarray,
    t_start: float,
    t_end: float,
    feed_on: bool,
    ua: float,
    method: str,
    relative_tolerance: float,
) -> _PiecewiseTrajectory:
    """Integrate segment by segment between feed-rate changes (end of dosing included)."""
    from scipy.integrate import solve_ivp

    breaks = {t_start, t_end}
    if balances.feed is not None and feed_on:
        breaks.update(t for t in balances.feed.breakpoints if t_start < t < t_end)
    breaks = sorted(breaks)
    state = np.array(initial_state, dtype=float)
    scale = np.array(
        [
            balances.final_mass,
            balances.mole_scale,
            balances.mole_scale,
            1.0,
            1.0,
            balances.final_mass * max(balances.decomposition_energy, 1.0),
        ]
    )
    absolute_tolerance = relative_tolerance * 1e-2 * scale
    segments = []
    for left, right in zip(breaks[:-1], breaks[1:]):
        mass_rate, molar_rate = balances.feed_rates(left, feed_on)
        rhs = _with_budget(balances.make_rhs(mass_rate, molar_rate, ua))
        try:
            solution = solve_ivp(
                rhs,
                (left, right),
                state,
                method=method,
                rtol=relative_tolerance,
                atol=absolute_tolerance,
                dense_output=True,
            )
        except _BudgetExceeded:
            raise SolverError(
                f"solve_ivp ({method}, rtol {relative_tolerance:g}) needed more than "
                f"{MAX_RHS_EVALUATIONS} evaluations between {left:.6g} s and {right:.6g} s "
                f"without finishing: the system is extremely stiff or runs away numerically "
                f"(check the rate constants and the decomposition kinetics)") from None
        except (OverflowError, FloatingPointError, ZeroDivisionError) as exc:
            raise SolverError(
                f"integration failed between {left:.6g} s and {right:.6g} s ({exc}); the "
                "kinetics or the decomposition model may overflow at the temperatures reached"
            ) from exc
        if not solution.success:
            raise SolverError(
                f"solve_ivp ({method}) failed between {left:.6g} s and {right:.6g} s: "
                f"{solution.message}"
            )
        segments.append(
            (left, right, solution.sol, solution.t, solution.y, (mass_rate, molar_rate, ua))
        )
        state = solution.y[:, -1].copy()
    return _PiecewiseTrajectory(balances, segments)


# --------------------------------------------------------------------------------------------
# Normal operation
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class HeatRates:
    """Heat flows of the balance at given times (all [W]; positive heats the mass).

    Attributes
    ----------
    time : numpy.ndarray
        Times. [s]
    reaction : numpy.ndarray
        ``(-dH_r) r V``. [W]
    decomposition : numpy.ndarray
        ``m q_dec``. [W]
    cooling : numpy.ndarray
        ``UA_eff (T - T_c)``, removed from the mass. [W]
    feed_sensible : numpy.ndarray
        ``mdot c'p (T_D - T)`` (negative for a cold feed). [W]
    feed_mass_rate : numpy.ndarray
        Feed mass rate (right-continuous). [kg/s]
    """

    time: np.ndarray
    reaction: np.ndarray
    decomposition: np.ndarray
    cooling: np.ndarray
    feed_sensible: np.ndarray
    feed_mass_rate: np.ndarray


@dataclass(frozen=True, eq=False)
class NormalOperation:
    """Trajectory of normal operation (cooling on, feed as planned).

    Arrays are sampled at ``time``; :meth:`state_at` evaluates the dense solution anywhere.

    Attributes
    ----------
    time : numpy.ndarray
        Output times. [s]
    temperature : numpy.ndarray
        Reaction-mass temperature. [K]
    mass : numpy.ndarray
        Reaction mass. [kg]
    moles_a, moles_b : numpy.ndarray
        Amounts of A and B present. [mol]
    decomposition_conversion : numpy.ndarray
        Conversion of the decomposition (equal to its initial value when none is modelled). [-]
    accumulation : numpy.ndarray
        X_ac(t) = min(n_A, n_B) / xi_total. [-]
    conversion : numpy.ndarray
        Extent over the total possible extent, (n_A0 - n_A) / xi_total. [-]
    reaction_heat_rate : numpy.ndarray
        ``(-dH_r) r V``. [W]
    cooling_rate : numpy.ndarray
        ``UA_eff (T - T_c)``. [W]
    decomposition_heat_rate : numpy.ndarray
        ``m q_dec``. [W]
    total_extent : float
        xi_total = min(n_A0, n_B0 + n_B,feed). [mol]
    final_mass : float
        Mass after all dosing. [kg]
    is_semi_batch : bool
        True when a non-empty feed is given.
    """

    time: np.ndarray
    temperature: np.ndarray
    mass: np.ndarray
    moles_a: np.ndarray
    moles_b: np.ndarray
    decomposition_conversion: np.ndarray
    accumulation: np.ndarray
    conversion: np.ndarray
    reaction_heat_rate: np.ndarray
    cooling_rate: np.ndarray
    decomposition_heat_rate: np.ndarray
    total_extent: float
    final_mass: float
    is_semi_batch: bool
    kinetics: SynthesisKinetics
    charge: ReactorCharge
    cooling: Cooling
    feed: Feed | None
    decomposition: Any
    method: str
    relative_tolerance: float
    _balances: _Balances = field(repr=False)
    _trajectory: _PiecewiseTrajectory = field(repr=False)

    @property
    def start_time(self) -> float:
        """Start of the simulation. [s]"""
        return self._trajectory.t_min

    @property
    def end_time(self) -> float:
        """End of the simulation. [s]"""
        return self._trajectory.t_max

    @property
    def solver_step_times(self) -> np.ndarray:
        """Times of the solver steps (dense where the solution changes fast). [s]"""
        return self._trajectory.all_step_times()

    def state_at(self, times) -> dict[str, np.ndarray]:
        """State from the dense solution.

        Parameters
        ----------
        times : float or array_like
            Times within the simulated interval. [s]

        Returns
        -------
        dict
            ``mass`` [kg], ``moles_a`` [mol], ``moles_b`` [mol], ``temperature`` [K],
            ``decomposition_conversion`` [-], ``decomposition_heat`` (integral of m q_dec) [J].
        """
        state = self._trajectory(times)
        return {
            "mass": state[_MASS],
            "moles_a": state[_MOLES_A],
            "moles_b": state[_MOLES_B],
            "temperature": state[_TEMPERATURE],
            "decomposition_conversion": state[_DECOMPOSITION],
            "decomposition_heat": state[_DECOMPOSITION_HEAT],
        }

    def accumulated_moles(self, times) -> np.ndarray:
        """n_acc(t) = max(min(n_A, n_B), 0): extent still possible with what is present.

        Parameters
        ----------
        times : float or array_like
            Times within the simulated interval. [s]

        Returns
        -------
        numpy.ndarray
            Accumulated moles. [mol]
        """
        state = self._trajectory(times)
        return np.maximum(np.minimum(state[_MOLES_A], state[_MOLES_B]), 0.0)

    def heat_rates(self, times) -> HeatRates:
        """Heat flows of the balance at ``times`` (see :class:`HeatRates`).

        Parameters
        ----------
        times : float or array_like
            Times within the simulated interval. [s]

        Returns
        -------
        HeatRates
            Reaction, decomposition, cooling and feed sensible heat flows. [W]
        """
        times = np.atleast_1d(np.asarray(times, dtype=float))
        reaction, decomposition, cooling, sensible, _, mass_rates, _ = self._trajectory.heat_flows(
            times
        )
        return HeatRates(times, reaction, decomposition, cooling, sensible, mass_rates)


def _checked_run_inputs(kinetics, charge, feed, end_time, output_points, relative_tolerance):
    """Validated (relative tolerance [-], end time [s], feed or None, total B [mol], possible
    extent [mol]) of a normal-operation run; raises ModelDomainError naming the input."""
    rtol = require_positive(relative_tolerance, "relative_tolerance")
    if rtol > 1e-3:
        raise ModelDomainError(
            f"relative_tolerance must be <= 1e-3, got {rtol!r}", key="relative_tolerance"
        )
    end_time = require_positive(end_time, "end_time")
    if int(output_points) < 2:
        raise ModelDomainError("output_points must be >= 2", key="output_points")
    if feed is not None and feed.is_empty:
        feed = None
    if feed is not None and feed.end_time > end_time:
        raise ModelDomainError(
            f"end_time {end_time:.6g} s ends before the dosing ({feed.end_time:.6g} s)",
            key="end_time",
        )
    feed_moles = 0.0 if feed is None else feed.moles_b
    total_b = charge.initial_moles_b + feed_moles
    total_extent = min(charge.initial_moles_a, total_b)
    if total_extent <= 0.0:
        raise ModelDomainError(
            "nothing can react: both A and B (charged plus dosed) must be > 0",
            key="initial_moles_a",
        )
    if kinetics.scheme == "first-order":
        # A first-order rate ignores the partner; it must never run out or n would go negative.
        if kinetics.first_order_reagent == "A" and charge.initial_moles_b < charge.initial_moles_a:
            raise ModelDomainError(
                "first order in A needs B charged at least equal to A from the start "
                f"(n_B0 = {charge.initial_moles_b:.6g} mol < "
                f"n_A0 = {charge.initial_moles_a:.6g} mol)",
                key="initial_moles_b",
            )
        if kinetics.first_order_reagent == "B" and charge.initial_moles_a < total_b:
            raise ModelDomainError(
                "first order in B needs A charged at least equal to all B (charged plus dosed)",
                key="initial_moles_a",
            )
    return rtol, end_time, feed, total_b, total_extent


def simulate_normal_operation(
    kinetics: SynthesisKinetics,
    charge: ReactorCharge,
    cooling: Cooling,
    end_time: float,
    feed: Feed | None = None,
    decomposition: DecompositionHeatSource | None = None,
    output_points: int = 501,
    method: str = "LSODA",
    relative_tolerance: float = 1e-8,
) -> NormalOperation:
    """Integrate the reactor balances for normal operation (cooling on, feed as planned).

    Balances (see the module docstring)::

        dm/dt = mdot,  dn_A/dt = -r V,  dn_B/dt = ndot_B - r V,
        m c'p dT/dt = mdot c'p (T_D - T) + (-dH_r) r V + m q_dec - UA_eff (T - T_c)

    integrated with ``scipy.integrate.solve_ivp`` (stiff method), split at each change of the feed
    rate (end of dosing included).

    Parameters
    ----------
    kinetics : SynthesisKinetics
        Desired reaction. [object]
    charge : ReactorCharge
        Initial contents. [object]
    cooling : Cooling
        Jacket. [object]
    end_time : float
        End of the simulated normal operation; must cover the dosing. [s]
    feed : Feed, optional
        Dosing of B; ``None`` or an empty feed is a batch run. [object]
    decomposition : DecompositionHeatSource, optional
        Decomposition of the reaction mass (duck-typed, see
        :class:`DecompositionHeatSource`). [object]
    output_points : int
        Number of evenly spaced output times (feed breakpoints are added). [-]
    method : {"LSODA", "Radau", "BDF"}
        Stiff solver of ``solve_ivp``. [text]
    relative_tolerance : float
        ``rtol`` of the solver; ``atol`` is ``rtol/100`` times the scale of each variable. [-]

    Returns
    -------
    NormalOperation
        Sampled trajectory plus the dense solution. [object]

    Raises
    ------
    ModelDomainError
        Inconsistent input (stoichiometry impossible for the first-order scheme, nothing to react,
        ``end_time`` before the end of dosing).
    SolverError
        The integration failed.
    """
    if method not in ("LSODA", "Radau", "BDF"):
        raise ModelDomainError(
            f"method must be a stiff solver (LSODA, Radau, BDF), got {method!r}", key="method"
        )
    rtol, end_time, feed, total_b, total_extent = _checked_run_inputs(
        kinetics, charge, feed, end_time, output_points, relative_tolerance)
    balances = _Balances(kinetics, charge, cooling, feed, decomposition)
    initial_conversion = 0.0 if decomposition is None else float(decomposition.initial_conversion)
    initial_state = np.array(
        [
            charge.initial_mass,
            charge.initial_moles_a,
            charge.initial_moles_b,
            charge.initial_temperature,
            initial_conversion,
            0.0,
        ]
    )
    trajectory = _integrate(balances, initial_state, 0.0, end_time, True, cooling.ua, method, rtol)
    times = np.linspace(0.0, end_time, int(output_points))
    if feed is not None:
        times = np.union1d(times, [t for t in feed.breakpoints if t <= end_time])
    state = trajectory(times)
    accumulated = np.maximum(np.minimum(state[_MOLES_A], state[_MOLES_B]), 0.0)
    normal = NormalOperation(
        time=times,
        temperature=state[_TEMPERATURE],
        mass=state[_MASS],
        moles_a=state[_MOLES_A],
        moles_b=state[_MOLES_B],
        decomposition_conversion=state[_DECOMPOSITION],
        accumulation=accumulated / total_extent,
        conversion=(charge.initial_moles_a - state[_MOLES_A]) / total_extent,
        reaction_heat_rate=np.empty(0),
        cooling_rate=np.empty(0),
        decomposition_heat_rate=np.empty(0),
        total_extent=total_extent,
        final_mass=balances.final_mass,
        is_semi_batch=feed is not None,
        kinetics=kinetics,
        charge=charge,
        cooling=cooling,
        feed=feed,
        decomposition=decomposition,
        method=method,
        relative_tolerance=rtol,
        _balances=balances,
        _trajectory=trajectory,
    )
    rates = normal.heat_rates(times)
    object.__setattr__(normal, "reaction_heat_rate", rates.reaction)
    object.__setattr__(normal, "cooling_rate", rates.cooling)
    object.__setattr__(normal, "decomposition_heat_rate", rates.decomposition)
    return normal


# --------------------------------------------------------------------------------------------
# MTSR(t)
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class MtsrProfile:
    """MTSR over the normal-operation trajectory.

    Attributes
    ----------
    time : numpy.ndarray
        Failure times. [s]
    accumulation : numpy.ndarray
        X_ac(t). [-]
    mtsr : numpy.ndarray
        Feed stopped, with the mass correction: ``T + n_acc (-dH_r)/(m(t) c'p)``. [K]
    mtsr_without_mass_correction : numpy.ndarray
        ``T + n_acc (-dH_r)/(m_final c'p)`` (underestimates in semi-batch; for comparison). [K]
    final_temperature_feed_continuing : numpy.ndarray
        Adiabatic end state if the feed runs to completion after the failure and everything
        reacts (energy balance of mixing and reaction; not the path maximum). [K]
    """

    time: np.ndarray
    accumulation: np.ndarray
    mtsr: np.ndarray
    mtsr_without_mass_correction: np.ndarray
    final_temperature_feed_continuing: np.ndarray


def mtsr_profile(
    normal: NormalOperation, times=None, adiabatic_rise_total: float | None = None
) -> MtsrProfile:
    """MTSR(t) if the cooling fails at t, vectorised over failure times.

    Feed stopped (mass correction derived in the module docstring)::

        MTSR(t) = T(t) + n_acc(t) (-dH_r) / (m(t) c'p)
                = T(t) + X_ac(t) dT_ad,total m_final / m(t)

    The second form is used when ``adiabatic_rise_total`` is given (e.g. measured in a reaction
    calorimeter) and reduces to the first when ``dT_ad,total = xi_total (-dH_r)/(m_final c'p)``.
    Feed continuing to the end (derived, adiabatic energy balance with constant c'p)::

        T_end(t) = [m(t) T(t) + m_rem T_D + n_rem (-dH_r)/c'p] / m_final,
        n_rem = min(n_A(t), n_B(t) + n_B,still to dose)

    References: Stoessel, Chem. Eng. Prog. 89(10) (1993) 68-75; Stoessel, Thermal Safety of
    Chemical Processes, Wiley-VCH 2008, ch. 7.

    Parameters
    ----------
    normal : NormalOperation
        Normal-operation trajectory. [object]
    times : array_like, optional
        Failure times; default the trajectory's output times. [s]
    adiabatic_rise_total : float, optional
        dT_ad of the whole synthesis referred to the final mass, overriding the model value. [K]

    Returns
    -------
    MtsrProfile
        X_ac(t), MTSR(t) with and without mass correction, end temperature with the feed
        continuing. [object]
    """
    times = normal.time if times is None else np.asarray(times, dtype=float)
    state = normal._trajectory(times)
    mass = state[_MASS]
    temperature = state[_TEMPERATURE]
    specific_heat = normal.charge.specific_heat
    heat = -normal.kinetics.molar_enthalpy
    accumulated = np.maximum(np.minimum(state[_MOLES_A], state[_MOLES_B]), 0.0)
    accumulation = accumulated / normal.total_extent
    if adiabatic_rise_total is None:
        rise_final_mass = accumulated * heat / (normal.final_mass * specific_heat)
    else:
        rise = require_non_negative(adiabatic_rise_total, "adiabatic_rise_total")
        rise_final_mass = accumulation * rise
    mtsr = temperature + rise_final_mass * normal.final_mass / mass
    if normal.feed is not None:
        remaining_fraction = 1.0 - np.asarray(normal.feed.dosed_fraction(times))
        remaining_mass = remaining_fraction * normal.feed.mass
        remaining_b = remaining_fraction * normal.feed.moles_b
        feed_temperature = normal.feed.feed_temperature
    else:
        remaining_mass = np.zeros_like(mass)
        remaining_b = np.zeros_like(mass)
        feed_temperature = 0.0
    remaining_extent = np.maximum(np.minimum(state[_MOLES_A], state[_MOLES_B] + remaining_b), 0.0)
    final_continuing = (
        mass * temperature
        + remaining_mass * feed_temperature
        + remaining_extent * heat / specific_heat
    ) / (mass + remaining_mass)
    return MtsrProfile(
        time=np.asarray(times, dtype=float),
        accumulation=accumulation,
        mtsr=mtsr,
        mtsr_without_mass_correction=temperature + rise_final_mass,
        final_temperature_feed_continuing=final_continuing,
    )


# --------------------------------------------------------------------------------------------
# Cooling failure
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class FailureContinuation:
    """Adiabatic course after a cooling failure.

    Attributes
    ----------
    failure_time : float
        t_f. [s]
    feed_continues : bool
        Whether the feed ran on as planned after the failure.
    time : numpy.ndarray
        Solver step times from t_f. [s]
    temperature : numpy.ndarray
        Temperature. [K]
    synthesis_temperature : numpy.ndarray
        Temperature without the decomposition heat released since t_f,
        ``T - (H_dec(t) - H_dec(t_f)) / (m c'p)`` (exact superposition for constant c'p). [K]
    decomposition_conversion : numpy.ndarray
        Decomposition conversion. [-]
    maximum_temperature : float
        Highest temperature within the simulated duration (decomposition included). [K]
    maximum_synthesis_temperature : float
        MTSR reached in the simulation (synthesis heat only). [K]
    maximum_technical_temperature : float
        MTT used for the event. [K]
    mtt_reached : bool
        Whether T reached MTT within the duration.
    time_to_mtt : float
        From t_f to the first time T = MTT; ``inf`` if not reached within the duration. [s]
    maximum_rate : float
        Highest dT/dt within the duration. [K/s]
    time_to_maximum_rate : float
        From t_f to the highest dT/dt (0 if the rate only falls). [s]
    decomposition_modelled : bool
        False when no decomposition model was given (then nothing about it is claimed).
    decomposition_triggered : bool
        The decomposition converted at least ``trigger_fraction`` of what remained at t_f within
        the duration (design criterion). Always False when not modelled; see ``warnings``.
    duration : float
        Simulated time after the failure. [s]
    warnings : tuple of str
        Limits of this result.
    """

    failure_time: float
    feed_continues: bool
    time: np.ndarray
    temperature: np.ndarray
    synthesis_temperature: np.ndarray
    decomposition_conversion: np.ndarray
    maximum_temperature: float
    maximum_synthesis_temperature: float
    maximum_technical_temperature: float
    mtt_reached: bool
    time_to_mtt: float
    maximum_rate: float
    time_to_maximum_rate: float
    decomposition_modelled: bool
    decomposition_triggered: bool
    duration: float
    warnings: tuple[str, ...]
    _trajectory: Any = field(default=None, repr=False, compare=False)

    def state_at(self, times) -> dict[str, np.ndarray]:
        """State of the continuation from its dense solution (e.g. for plotting).

        Parameters
        ----------
        times : float or array_like
            Absolute times within [t_f, t_f + duration]. [s]

        Returns
        -------
        dict
            ``mass`` [kg], ``moles_a`` [mol], ``moles_b`` [mol], ``temperature`` [K],
            ``decomposition_conversion`` [-], ``decomposition_heat`` (integral of m q_dec) [J].
        """
        state = self._trajectory(times)
        return {
            "mass": state[_MASS],
            "moles_a": state[_MOLES_A],
            "moles_b": state[_MOLES_B],
            "temperature": state[_TEMPERATURE],
            "decomposition_conversion": state[_DECOMPOSITION],
            "decomposition_heat": state[_DECOMPOSITION_HEAT],
        }


_NO_DECOMPOSITION_WARNING = (
    "no decomposition kinetics given: the adiabatic course covers the synthesis reaction only; "
    "the decomposition is not assessed"
)


def _refine_maximum(function, times, values, index):
    """Refine a maximum found on sampled points with a bounded scalar search."""
    from scipy.optimize import minimize_scalar

    if index <= 0 or index >= len(times) - 1:
        return float(times[index]), float(values[index])
    left, right = float(times[index - 1]), float(times[index + 1])
    if right <= left:
        return float(times[index]), float(values[index])
    result = minimize_scalar(
        lambda t: -function(t),
        bounds=(left, right),
        method="bounded",
        options={"xatol": 1e-9 * max(abs(right), 1.0)},
    )
    if -result.fun > values[index]:
        return float(result.x), float(-result.fun)
    return float(times[index]), float(values[index])


def _time_of_first_crossing(trajectory, times, temperatures, threshold, failure_time) -> float:
    """Time after the failure [s] at which the temperature first reaches ``threshold`` [K]:
    bracketed on the solver steps, located on the dense output; inf if never, 0 if at once."""
    above = np.flatnonzero(temperatures >= threshold)
    if above.size == 0:
        return math.inf
    if above[0] == 0:
        return 0.0
    from scipy.optimize import brentq

    right = float(times[above[0]])
    left = float(times[above[0] - 1])
    crossing = brentq(lambda t: float(trajectory(t)[_TEMPERATURE]) - threshold, left, right,
                      xtol=1e-10 * max(right, 1.0))
    return crossing - failure_time


def _refined_maxima(trajectory, times, state, synthesis_temperature, step_times, step_rates,
                    reference_heat, specific_heat):
    """(maximum temperature [K], maximum synthesis temperature [K], time of the maximum heating
    rate [s], maximum heating rate [K/s]) of a continuation, refined on the dense output."""

    def temperature_at(time):
        return float(trajectory(time)[_TEMPERATURE])

    def synthesis_temperature_at(time):
        point = trajectory(time)
        return float(
            point[_TEMPERATURE]
            - (point[_DECOMPOSITION_HEAT] - reference_heat) / (point[_MASS] * specific_heat)
        )

    index = int(np.argmax(state[_TEMPERATURE]))
    _, maximum_temperature = _refine_maximum(temperature_at, times, state[_TEMPERATURE], index)
    index = int(np.argmax(synthesis_temperature))
    _, maximum_synthesis = _refine_maximum(
        synthesis_temperature_at, times, synthesis_temperature, index
    )
    index = int(np.argmax(step_rates))
    time_of_maximum_rate, maximum_rate = _refine_maximum(
        trajectory.temperature_rate, step_times, step_rates, index
    )
    return maximum_temperature, maximum_synthesis, time_of_maximum_rate, maximum_rate


def failure_continuation(
    normal: NormalOperation,
    failure_time: float,
    feed_continues: bool,
    maximum_technical_temperature: float,
    duration: float = 24.0 * SECONDS_PER_HOUR,
    trigger_fraction: float = 0.5,
) -> FailureContinuation:
    """Adiabatic continuation after a cooling failure at ``failure_time``.

    Starts from the dense normal-operation state at t_f (no re-integration from t = 0) and
    integrates the same balances with ``UA = 0``, the feed stopped or running on as planned. The
    first crossing of T = MTT is located by a solver event; the maximum of dT/dt is found on the
    solver steps and refined by a bounded scalar search on the dense output.

    Parameters
    ----------
    normal : NormalOperation
        Normal-operation trajectory. [object]
    failure_time : float
        t_f, within the simulated normal operation. [s]
    feed_continues : bool
        True: the feed runs on as planned; False: it stops at t_f. [bool]
    maximum_technical_temperature : float
        MTT. [K]
    duration : float
        Simulated time after the failure (default 24 h, the usual TMRad horizon; design). [s]
    trigger_fraction : float
        Decomposition counted as triggered once it converted this fraction of what remained at t_f
        (default 0.5; design). [-]

    Returns
    -------
    FailureContinuation
        Temperature course, MTSR reached, time to MTT and to maximum rate, decomposition
        flag (SI). [object]
    """
    t_f = require_finite(failure_time, "failure_time")
    if t_f < normal.start_time or t_f > normal.end_time:
        raise ModelDomainError(
            f"failure_time {t_f:.6g} s outside the normal operation [{normal.start_time:.6g}, "
            f"{normal.end_time:.6g}] s",
            key="failure_time",
        )
    mtt = require_positive(maximum_technical_temperature, "maximum_technical_temperature")
    duration = require_positive(duration, "duration")
    trigger = require_positive(trigger_fraction, "trigger_fraction")
    if trigger > 1.0:
        raise ModelDomainError("trigger_fraction must be within (0, 1]", key="trigger_fraction")
    balances = normal._balances
    initial_state = normal._trajectory(t_f)

    trajectory = _integrate(
        balances,
        initial_state,
        t_f,
        t_f + duration,
        bool(feed_continues),
        0.0,
        normal.method,
        normal.relative_tolerance,
    )
    # Steps on a feed breakpoint appear twice (end of one segment, start of the next); the rate
    # may jump there, so both values are kept for the rate search.
    step_times, step_states, step_rates = trajectory.step_temperature_rates()
    times, unique_index = np.unique(step_times, return_index=True)
    state = step_states[:, unique_index]
    specific_heat = balances.specific_heat
    reference_heat = initial_state[_DECOMPOSITION_HEAT]
    synthesis_temperature = state[_TEMPERATURE] - (state[_DECOMPOSITION_HEAT] - reference_heat) / (
        state[_MASS] * specific_heat
    )

    (maximum_temperature, maximum_synthesis, time_of_maximum_rate,
     maximum_rate) = _refined_maxima(trajectory, times, state, synthesis_temperature, step_times,
                                     step_rates, reference_heat, specific_heat)
    time_to_mtt = _time_of_first_crossing(trajectory, times, state[_TEMPERATURE], mtt, t_f)
    warnings: list[str] = []
    modelled = normal.decomposition is not None
    if modelled:
        remaining = 1.0 - initial_state[_DECOMPOSITION]
        converted = state[_DECOMPOSITION, -1] - initial_state[_DECOMPOSITION]
        triggered = bool(remaining <= 0.0 or converted >= trigger * remaining)
    else:
        triggered = False
        warnings.append(_NO_DECOMPOSITION_WARNING)
    return FailureContinuation(
        failure_time=t_f,
        feed_continues=bool(feed_continues),
        time=times,
        temperature=state[_TEMPERATURE],
        synthesis_temperature=synthesis_temperature,
        decomposition_conversion=state[_DECOMPOSITION],
        maximum_temperature=maximum_temperature,
        maximum_synthesis_temperature=maximum_synthesis,
        maximum_technical_temperature=mtt,
        mtt_reached=math.isfinite(time_to_mtt),
        time_to_mtt=time_to_mtt,
        maximum_rate=maximum_rate,
        time_to_maximum_rate=time_of_maximum_rate - t_f,
        decomposition_modelled=modelled,
        decomposition_triggered=triggered,
        duration=duration,
        warnings=tuple(warnings),
        _trajectory=trajectory,
    )


# --------------------------------------------------------------------------------------------
# Worst case
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class ContinuationScan:
    """Adiabatic continuations over a grid of failure times, for one feed mode.

    Attributes
    ----------
    feed_continues : bool
        Feed mode of this scan.
    failure_times : numpy.ndarray
        t_f of each continuation. [s]
    maximum_synthesis_temperature : numpy.ndarray
        MTSR reached. [K]
    maximum_temperature : numpy.ndarray
        Highest temperature, decomposition included. [K]
    time_to_mtt : numpy.ndarray
        From t_f to MTT (``inf``: not reached within the duration). [s]
    time_to_maximum_rate : numpy.ndarray
        From t_f to the highest dT/dt. [s]
    decomposition_triggered : numpy.ndarray of bool
        Decomposition flag of each continuation.
    worst : FailureContinuation
        Continuation at the worst failure time of this mode.
    """

    feed_continues: bool
    failure_times: np.ndarray
    maximum_synthesis_temperature: np.ndarray
    maximum_temperature: np.ndarray
    time_to_mtt: np.ndarray
    time_to_maximum_rate: np.ndarray
    decomposition_triggered: np.ndarray
    worst: FailureContinuation

    @property
    def shortest_time_to_mtt(self) -> float:
        """Shortest time from failure to MTT over the scan (``inf``: never reached). [s]"""
        return float(min(np.min(self.time_to_mtt), self.worst.time_to_mtt))


@dataclass(frozen=True)
class WorstCaseScan:
    """Worst cooling-failure time over the normal operation.

    Attributes
    ----------
    profile : MtsrProfile
        X_ac(t) and MTSR(t) on the normal-operation output times.
    worst_failure_time : float
        Failure time of the highest MTSR(t) (feed stopped, mass-corrected). [s]
    maximum_mtsr : float
        That MTSR. [K]
    accumulation_at_worst : float
        X_ac at the worst failure time. [-]
    maximum_accumulation : float
        Highest X_ac(t). [-]
    time_of_maximum_accumulation : float
        Its time. [s]
    feed_stopped : ContinuationScan
        Continuations with the feed stopped at failure.
    feed_continuing : ContinuationScan
        Continuations with the feed running on; its worst time maximises the simulated MTSR
        reached.
    time_to_mtt : float
        From the worst failure (feed stopped) to MTT. [s]
    time_to_maximum_rate : float
        From the worst failure (feed stopped) to the highest dT/dt. [s]
    decomposition_triggered : bool
        True if any continuation of either mode triggered the decomposition.
    continuation_count : int
        Number of adiabatic continuations integrated.
    warnings : tuple of str
        Limits of this result.
    """

    profile: MtsrProfile
    worst_failure_time: float
    maximum_mtsr: float
    accumulation_at_worst: float
    maximum_accumulation: float
    time_of_maximum_accumulation: float
    feed_stopped: ContinuationScan
    feed_continuing: ContinuationScan
    time_to_mtt: float
    time_to_maximum_rate: float
    decomposition_triggered: bool
    continuation_count: int
    warnings: tuple[str, ...]


def _local_maxima(values: np.ndarray, count: int) -> list[int]:
    """Indices of the ``count`` highest local maxima of a sampled curve (ends included)."""
    padded = np.concatenate(([-np.inf], values, [-np.inf]))
    is_peak = (padded[1:-1] >= padded[:-2]) & (padded[1:-1] >= padded[2:])
    peaks = np.flatnonzero(is_peak)
    return [int(i) for i in peaks[np.argsort(values[peaks])[::-1][:count]]]


def _maximise_on_curve(function_vector, grid: np.ndarray, refine: bool, candidates: int = 3):
    """Maximum of a cheap curve: sample on a grid, refine the best local maxima."""
    from scipy.optimize import minimize_scalar

    values = function_vector(grid)
    best_time = float(grid[int(np.argmax(values))])
    best_value = float(np.max(values))
    if not refine:
        return best_time, best_value
    span = float(grid[-1] - grid[0])
    for index in _local_maxima(values, candidates):
        left = float(grid[max(index - 1, 0)])
        right = float(grid[min(index + 1, len(grid) - 1)])
        if right <= left:
            continue
        result = minimize_scalar(
            lambda t: -float(function_vector(np.array([t]))[0]),
            bounds=(left, right),
            method="bounded",
            options={"xatol": 1e-9 * max(span, 1.0)},
        )
        if -result.fun > best_value:
            best_time, best_value = float(result.x), float(-result.fun)
    return best_time, best_value


def _scan_mode(
    normal, failure_times, feed_continues, mtt, duration, trigger_fraction, worst_time
) -> tuple[ContinuationScan, int]:
    results = [
        failure_continuation(normal, t, feed_continues, mtt, duration, trigger_fraction)
        for t in failure_times
    ]
    count = len(results)
    synthesis = np.array([r.maximum_synthesis_temperature for r in results])
    if worst_time is None:
        # Feed running on: no closed form for the path maximum, so refine on the simulation.
        from scipy.optimize import minimize_scalar

        index = int(np.argmax(synthesis))
        best = results[index]
        left = float(failure_times[max(index - 1, 0)])
        right = float(failure_times[min(index + 1, len(failure_times) - 1)])
        evaluated = {}

        def negative_mtsr(t):
            result = failure_continuation(
                normal, t, feed_continues, mtt, duration, trigger_fraction
            )
            evaluated[t] = result
            return -result.maximum_synthesis_temperature

        if right > left:
            minimize_scalar(
                negative_mtsr,
                bounds=(left, right),
                method="bounded",
                options={"xatol": 1e-4 * (right - left), "maxiter": 25},
            )
            count += len(evaluated)
            for result in evaluated.values():
                if result.maximum_synthesis_temperature > best.maximum_synthesis_temperature:
                    best = result
        worst = best
    else:
        worst = failure_continuation(
            normal, worst_time, feed_continues, mtt, duration, trigger_fraction
        )
        count += 1
    scan = ContinuationScan(
        feed_continues=feed_continues,
        failure_times=np.asarray(failure_times, dtype=float),
        maximum_synthesis_temperature=synthesis,
        maximum_temperature=np.array([r.maximum_temperature for r in results]),
        time_to_mtt=np.array([r.time_to_mtt for r in results]),
        time_to_maximum_rate=np.array([r.time_to_maximum_rate for r in results]),
        decomposition_triggered=np.array([r.decomposition_triggered for r in results], dtype=bool),
        worst=worst,
    )
    return scan, count


def worst_case_scan(
    normal: NormalOperation,
    maximum_technical_temperature: float,
    n_initial: int = 50,
    refine: bool = True,
    n_failure_times: int = 100,
    scan_interval: tuple[float, float] | None = None,
    duration: float = 24.0 * SECONDS_PER_HOUR,
    trigger_fraction: float = 0.5,
) -> WorstCaseScan:
    """Scan the cooling-failure time for the worst case, feed stopped and feed continuing.

    1. MTSR(t) (feed stopped, mass-corrected, see :func:`mtsr_profile`) is cheap on the dense
       solution: it is sampled on ``n_initial`` even times plus the solver steps and feed
       breakpoints, and the three highest local maxima are refined with a bounded Brent search
       (``scipy.optimize.minimize_scalar``).
    2. The adiabatic continuation (:func:`failure_continuation`) is integrated at
       ``n_failure_times`` even failure times and at the worst time, for both feed modes. With the
       feed running on, the worst time is the one with the highest simulated MTSR reached, refined
       by a bounded search on the continuation itself.

    Parameters
    ----------
    normal : NormalOperation
        Normal-operation trajectory. [object]
    maximum_technical_temperature : float
        MTT. [K]
    n_initial : int
        Even sample count of the cheap MTSR(t) curve. [-]
    refine : bool
        Refine the maximum of MTSR(t) (otherwise take the best sample). [bool]
    n_failure_times : int
        Even failure times with a full continuation per feed mode. [-]
    scan_interval : (float, float), optional
        Failure-time interval; default the whole simulated normal operation (dosing and
        after-reaction; design, the more conservative choice). [s]
    duration : float
        Simulated time after each failure. [s]
    trigger_fraction : float
        See :func:`failure_continuation`. [-]

    Returns
    -------
    WorstCaseScan
        Worst failure time, maximum MTSR, X_ac profile, times to MTT and to maximum rate,
        decomposition flag, and the per-mode continuation scans. [object]
    """
    if int(n_initial) < 3 or int(n_failure_times) < 2:
        raise ModelDomainError("n_initial must be >= 3 and n_failure_times >= 2", key="n_initial")
    if scan_interval is None:
        start, end = normal.start_time, normal.end_time
    else:
        start = require_finite(scan_interval[0], "scan_interval[0]")
        end = require_finite(scan_interval[1], "scan_interval[1]")
        if not normal.start_time <= start < end <= normal.end_time:
            raise ModelDomainError(
                "scan_interval must lie within the simulated normal operation and be increasing",
                key="scan_interval",
            )
    mtt = require_positive(maximum_technical_temperature, "maximum_technical_temperature")

    def mtsr_vector(times):
        return mtsr_profile(normal, times).mtsr

    grid = np.linspace(start, end, int(n_initial))
    extra = normal.solver_step_times
    if normal.feed is not None:
        extra = np.concatenate((extra, normal.feed.breakpoints))
    grid = np.union1d(grid, extra[(extra >= start) & (extra <= end)])
    worst_time, maximum_mtsr = _maximise_on_curve(mtsr_vector, grid, refine)

    accumulation_grid = mtsr_profile(normal, grid).accumulation
    index = int(np.argmax(accumulation_grid))
    failure_times = np.linspace(start, end, int(n_failure_times))
    stopped, count_stopped = _scan_mode(
        normal, failure_times, False, mtt, duration, trigger_fraction, worst_time
    )
    if normal.feed is None:
        # Batch: nothing to feed, so both modes are the same integration.
        from dataclasses import replace

        continuing = replace(
            stopped, feed_continues=True, worst=replace(stopped.worst, feed_continues=True)
        )
        count_continuing = 0
    else:
        continuing, count_continuing = _scan_mode(
            normal, failure_times, True, mtt, duration, trigger_fraction, None
        )
    warnings = list(stopped.worst.warnings)
    remaining = float(normal.accumulation[-1])
    if remaining > 0.01:
        # 1 % is a design threshold: later failures are not covered by the scan.
        warnings.append(
            f"the synthesis is not complete at the end of the simulated normal operation "
            f"(X_ac = {remaining:.3f} at {normal.end_time:.6g} s); extend end_time so that "
            "later failure times are covered"
        )
    if normal.feed is None:
        warnings.append("batch run: feed stopped and feed continuing are the same case")
    triggered = bool(
        np.any(stopped.decomposition_triggered)
        or np.any(continuing.decomposition_triggered)
        or stopped.worst.decomposition_triggered
        or continuing.worst.decomposition_triggered
    )
    return WorstCaseScan(
        profile=mtsr_profile(normal),
        worst_failure_time=worst_time,
        maximum_mtsr=maximum_mtsr,
        accumulation_at_worst=float(mtsr_profile(normal, [worst_time]).accumulation[0]),
        maximum_accumulation=float(accumulation_grid[index]),
        time_of_maximum_accumulation=float(grid[index]),
        feed_stopped=stopped,
        feed_continuing=continuing,
        time_to_mtt=stopped.worst.time_to_mtt,
        time_to_maximum_rate=stopped.worst.time_to_maximum_rate,
        decomposition_triggered=triggered,
        continuation_count=count_stopped + count_continuing,
        warnings=tuple(warnings),
    )


# --------------------------------------------------------------------------------------------
# Dosing warnings
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class DosingWarning:
    """One warning about the dosing or the process temperature.

    Attributes
    ----------
    code : str
        Stable identifier: ``"accumulation"``, ``"stated_accumulation_low"``,
        ``"dosing_faster_than_cooling"``, ``"reaction_release_exceeds_cooling"``,
        ``"no_cooling_driving_force"`` or ``"reaction_too_slow_for_feed"``.
    message : str
        Sentence for the user.
    value : float
        The figure that triggered it (unit in the message).
    limit : float
        The limit it was compared with.
    """

    code: str
    message: str
    value: float
    limit: float


@dataclass(frozen=True)
class DosingAssessment:
    """Figures behind the dosing warnings, and the warnings themselves.

    Attributes
    ----------
    maximum_accumulation : float
        Highest X_ac(t) on the output times. [-]
    dosing_heat_rate : float
        Peak dosing-controlled heat release, ``max[(-dH_r) ndot_B - mdot c'p (T_p - T_D)]``;
        0 for a batch. [W]
    peak_reaction_heat_rate : float
        Highest simulated reaction heat release. [W]
    cooling_capacity : float
        ``UA_eff (T_p - T_c)`` at the initial mass (smallest UA when scaled with fill). [W]
    damkoehler_number : float
        Da of the feed (see :func:`dosing_warnings`); ``inf`` for a batch. [-]
    warnings : tuple of DosingWarning
        Warnings raised.
    """

    maximum_accumulation: float
    dosing_heat_rate: float
    peak_reaction_heat_rate: float
    cooling_capacity: float
    damkoehler_number: float
    warnings: tuple[DosingWarning, ...]


def _accumulation_warnings(normal, limit, stated_accumulation, warnings) -> float:
    """Maximum X_ac [-] of the run; warns above ``limit`` and when a stated value is lower."""
    maximum_accumulation = float(np.max(normal.accumulation))
    if maximum_accumulation > limit:
        kind = (
            "semi-batch" if normal.is_semi_batch else "batch (everything is present at the start)"
        )
        warnings.append(
            DosingWarning(
                "accumulation",
                f"maximum accumulation {maximum_accumulation:.3f} exceeds the limit {limit:.3f} "
                f"({kind}); a cooling failure then releases much of the reaction heat",
                maximum_accumulation,
                limit,
            )
        )
    if stated_accumulation is not None:
        stated = require_non_negative(stated_accumulation, "stated_accumulation")
        if stated < maximum_accumulation:
            warnings.append(
                DosingWarning(
                    "stated_accumulation_low",
                    f"stated accumulation {stated:.3f} is lower than the simulated maximum "
                    f"{maximum_accumulation:.3f}; MTSR from the stated value is not conservative",
                    stated,
                    maximum_accumulation,
                )
            )
    return maximum_accumulation


def _cooling_capacity_at_process_temperature(normal, t_p, warnings) -> float:
    """UA_eff (T_p - T_c) at the initial fill [W]; warns when the coolant is not colder."""
    balances = normal._balances
    ua_initial = balances.effective_ua(normal.cooling.ua, normal.charge.initial_mass)
    driving = t_p - normal.cooling.coolant_temperature
    capacity = ua_initial * driving
    if driving <= 0.0:
        warnings.append(
            DosingWarning(
                "no_cooling_driving_force",
                f"coolant temperature {normal.cooling.coolant_temperature:.2f} K is not below the "
                f"process temperature {t_p:.2f} K: the jacket cannot remove reaction heat",
                driving,
                0.0,
            )
        )
    return capacity


def _feed_warnings(normal, t_p, capacity, da_limit, warnings) -> tuple[float, float]:
    """Dosing-controlled heat release [W] and the Damkoehler number of the feed [-], with their
    warnings (inf and 0 W without a feed)."""
    balances = normal._balances
    heat = -normal.kinetics.molar_enthalpy
    dosing_heat = 0.0
    damkoehler = math.inf
    feed = normal.feed
    if feed is not None:
        for start, end, fraction in feed.profile:
            rate = fraction / (end - start)
            mass_rate = rate * feed.mass
            release = heat * rate * feed.moles_b - mass_rate * balances.specific_heat * (
                t_p - feed.feed_temperature
            )
            dosing_heat = max(dosing_heat, release)
        if dosing_heat > capacity:
            warnings.append(
                DosingWarning(
                    "dosing_faster_than_cooling",
                    f"dosing-controlled heat release {dosing_heat / 1e3:.4g} kW exceeds the "
                    f"cooling capacity {capacity / 1e3:.4g} kW at T_p: dosing faster than the "
                    "vessel can cool",
                    dosing_heat,
                    capacity,
                )
            )
        dose_time = feed.end_time - feed.begin_time
        k = normal.kinetics.rate_constant(t_p)
        if normal.kinetics.scheme == "second-order":
            final_volume = normal.final_mass / normal.charge.density
            total_b = normal.charge.initial_moles_b + feed.moles_b
            damkoehler = k * dose_time * total_b / final_volume
        else:
            damkoehler = k * dose_time
        if damkoehler < da_limit:
            warnings.append(
                DosingWarning(
                    "reaction_too_slow_for_feed",
                    f"Damkoehler number of the feed {damkoehler:.3g} is below {da_limit:.3g}: at "
                    f"{t_p:.2f} K the reaction cannot keep pace with the feed and reactant "
                    "accumulates (process temperature too low or dosing too fast)",
                    damkoehler,
                    da_limit,
                )
            )
    return dosing_heat, damkoehler


def dosing_warnings(
    normal: NormalOperation,
    accumulation_limit: float = 0.3,
    damkoehler_limit: float = 1.0,
    process_temperature: float | None = None,
    stated_accumulation: float | None = None,
) -> DosingAssessment:
    """Warnings about accumulation, dosing rate against cooling, and a too-cold process.

    - Accumulation: ``max X_ac(t) > accumulation_limit`` (default 0.3; design, common practice,
      no source). If ``stated_accumulation`` (e.g. from a calorimeter run) is lower than the
      simulated maximum, that is warned as well.
    - Cooling: the dosing-controlled release (the feed reacting as it enters)
      ``(-dH_r) ndot_B - mdot c'p (T_p - T_D)`` or the simulated peak reaction release exceeds the
      cooling capacity ``UA_eff (T_p - T_c)`` at the process temperature, or ``T_p <= T_c``.
    - Too cold (Damkoehler number of the feed, design definition)::

          second order:     Da = k(T_p) t_dose n_B,total / V_final,   V_final = m_final / rho
          first order:      Da = k(T_p) t_dose

      with t_dose from the first to the last feed piece. Da is the dosing time over the
      characteristic reaction time; roughly X_ac ~ 1/Da when Da >> 1 (derived, pseudo-first order
      in B). Using the final volume and n_B,total (not the excess A) gives the smaller, more
      cautious Da. ``Da < damkoehler_limit`` (default 1; design) warns. Structure as in
      Steensma & Westerterp, Chem. Eng. Sci. 43 (1988) 2125 (notation from memory).

    Parameters
    ----------
    normal : NormalOperation
        Normal-operation trajectory. [object]
    accumulation_limit : float
        Highest acceptable X_ac. [-]
    damkoehler_limit : float
        Lowest acceptable Da. [-]
    process_temperature : float, optional
        T_p; default the initial temperature of the charge. [K]
    stated_accumulation : float, optional
        Accumulation stated elsewhere (e.g. the case file), compared with the simulation. [-]

    Returns
    -------
    DosingAssessment
        Figures and warnings. [object]
    """
    limit = require_non_negative(accumulation_limit, "accumulation_limit")
    da_limit = require_non_negative(damkoehler_limit, "damkoehler_limit")
    t_p = (
        normal.charge.initial_temperature
        if process_temperature is None
        else require_positive(process_temperature, "process_temperature")
    )
    warnings: list[DosingWarning] = []
    maximum_accumulation = _accumulation_warnings(normal, limit, stated_accumulation, warnings)
    capacity = _cooling_capacity_at_process_temperature(normal, t_p, warnings)
    dosing_heat, damkoehler = _feed_warnings(normal, t_p, capacity, da_limit, warnings)
    peak_release = float(np.max(normal.reaction_heat_rate))
    if peak_release > capacity and not any(
        w.code == "dosing_faster_than_cooling" for w in warnings
    ):
        warnings.append(
            DosingWarning(
                "reaction_release_exceeds_cooling",
                f"simulated peak reaction heat release {peak_release / 1e3:.4g} kW exceeds the "
                f"cooling capacity {capacity / 1e3:.4g} kW at T_p",
                peak_release,
                capacity,
            )
        )
    return DosingAssessment(
        maximum_accumulation=maximum_accumulation,
        dosing_heat_rate=dosing_heat,
        peak_reaction_heat_rate=peak_release,
        cooling_capacity=capacity,
        damkoehler_number=float(damkoehler),
        warnings=tuple(warnings),
    )
