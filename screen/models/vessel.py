"""Geometry of a vertical cylindrical jacketed vessel with a dished or flat bottom.

All lengths in m, areas in m^2, volumes in m^3. Every height (liquid level, jacket top) is
measured from one datum: the lowest point of the inside of the bottom (the apex of a dished head,
the plate of a flat bottom). The wall is treated as thin: the head proportions are applied to the
inside diameter ``D`` (the standards quote them on the outside diameter; the difference is of the
order of the wall thickness and is ignored in screening).

Bottom shapes (``bottom`` argument)
-----------------------------------
``"flat"``
    Flat plate, depth 0, volume 0, area pi D^2/4.
``"torispherical"``
    Standard dished head with crown radius R = D and knuckle radius r = 0.1 D (the shape of
    DIN 28011, the "Kloepper" head; proportions from memory).
``"torispherical-0.8"``
    Deeper dished head with crown radius R = 0.8 D and knuckle radius r = 0.154 D (the shape of
    DIN 28013; proportions from memory).
``"torispherical-asme"``
    Flanged-and-dished head with crown radius R = D and knuckle radius r = 0.06 D (the usual
    ASME proportions; from memory). Its volume, 0.0810 D^3, is the often-quoted "0.0809 D^3".
``"elliptical"``
    2:1 semi-ellipsoidal head: horizontal semi-axis a = D/2, vertical semi-axis b = D/4.

Formulas (the head is a surface of revolution about the vessel axis; z is the height above the
apex, r(z) the inside radius at that height)
------------------------------------------------------------------------------------------------
Volume to level z: ``V(z) = pi * integral_0^z r(s)^2 ds``; wetted area to level z:
``A(z) = 2 pi * integral_0^z r(s) sqrt(1 + r'(s)^2) ds``. Closed forms are used for both:

* Spherical crown (torispherical, z <= z1): cap volume ``pi z^2 (R - z/3)`` and zone area
  ``2 pi R z`` (Archimedes; any handbook of geometry, e.g. Bronstein & Semendjajew, Handbook of
  Mathematics).
* Toroidal knuckle (torispherical, z1 < z <= h): with c = D/2 - r and u = h - z the distance
  below the knuckle centre, ``r(z) = c + sqrt(r^2 - u^2)``; volume from the antiderivative
  ``F(w) = (c^2 + r^2) w - w^3/3 + c (w sqrt(r^2 - w^2) + r^2 arcsin(w/r))`` and area
  ``2 pi r [c (theta1 - theta) + r (sin theta1 - sin theta)]`` with ``sin theta = u/r``
  (derived: Pappus-type integration of the torus zone).
* Head depth and crown/knuckle junction (derived from the tangency of the two arcs):
  ``h = R - sqrt((R - r)^2 - c^2)``, ``sin alpha = c/(R - r)``, ``z1 = R (1 - cos alpha)``.
* 2:1 ellipsoid: ``V(z) = pi a^2 (z^2/b - z^3/(3 b^2))``; zone area with y = b - z measured from
  the equator, ``A = 2 pi a [G(b) - G(y)]``, ``G(w) = (w sqrt(1 + k^2 w^2) + asinh(k w)/k)/2``,
  ``k = sqrt(a^2 - b^2)/b^2`` (derived). The full head, ``pi a^2 + pi a asinh(k b)/k``, equals
  half the surface of the oblate spheroid, ``S/2 = pi a^2 + (pi b^2/(2 e)) ln((1 + e)/(1 - e))``
  with ``e = sqrt(1 - b^2/a^2)`` (standard result; e.g. Bronstein & Semendjajew).

The shell adds ``pi D^2/4`` of volume and ``pi D`` of wall area per metre of height above the head.

Examples
--------
D = 2 m, by hand. 2:1 elliptical head (a = 1 m, b = 0.5 m): volume pi D^3/24 = pi * 8/24 =
1.047198 m^3; inside area from the oblate-spheroid formula, e = sqrt(1 - 0.25) = 0.866025,
pi + (pi * 0.25/(2 * 0.866025)) ln(1.866025/0.133975) = 3.141593 + 0.453450 * 2.633916 =
4.335941 m^2 (1.0840 D^2); depth b = 0.5 m, so a level of 1.5 m holds the head plus 1 m of shell,
1.047198 + pi * 1^2 * 1 = 4.188790 m^3. Flat bottom filled with pi m^3: level 1 m, wetted area
plate + wall = pi * 1^2 + pi * 2 * 1 = 9.424778 m^2.

>>> round(head_volume(2.0, "elliptical"), 6), round(head_inner_area(2.0, "elliptical"), 6)
(1.047198, 4.335941)
>>> round(filled_volume(1.5, 2.0, "elliptical"), 6)
4.18879
>>> round(wetted_area(math.pi, 2.0, "flat"), 6)
9.424778
"""

from __future__ import annotations

import math

import numpy as np

from screen.errors import ModelDomainError, SolverError
from screen.models.domain import require_positive, scalar_or_array

__all__ = [
    "BOTTOM_SHAPES",
    "head_volume",
    "head_depth",
    "head_inner_area",
    "liquid_height",
    "filled_volume",
    "wetted_area",
    "fill_fraction",
    "cylinder_height_for_volume",
    "similar_vessel",
]

#: Accepted bottom shapes and their (crown radius / D, knuckle radius / D); None for non-dished.
BOTTOM_SHAPES: dict[str, tuple[float, float] | None] = {
    "flat": None,
    "torispherical": (1.0, 0.1),
    "torispherical-0.8": (0.8, 0.154),
    "torispherical-asme": (1.0, 0.06),
    "elliptical": None,
}

# 2:1 ellipsoid on a unit diameter: semi-axes and the constant k of the zone-area antiderivative.
_ELLIPSE_A = 0.5
_ELLIPSE_B = 0.25
_ELLIPSE_K = math.sqrt(_ELLIPSE_A**2 - _ELLIPSE_B**2) / _ELLIPSE_B**2


class _Torisphere:
    """Dimensionless torispherical head on a unit diameter (all lengths divided by D)."""

    def __init__(self, crown: float, knuckle: float):
        self.crown = crown
        self.knuckle = knuckle
        self.offset = 0.5 - knuckle  # radial position c of the knuckle-circle centre
        sin_alpha = self.offset / (crown - knuckle)
        cos_alpha = math.sqrt(1.0 - sin_alpha**2)
        self.depth = crown - (crown - knuckle) * cos_alpha
        self.crown_top = crown * (1.0 - cos_alpha)  # z1, crown/knuckle junction
        self.theta_junction = math.pi / 2.0 - math.asin(sin_alpha)  # theta1
        self.u_junction = knuckle * cos_alpha  # h - z1

    def _knuckle_antiderivative(self, w: float) -> float:
        c, r = self.offset, self.knuckle
        root = math.sqrt(max(r * r - w * w, 0.0))
        return (c * c + r * r) * w - w**3 / 3.0 + c * (w * root + r * r * math.asin(min(w / r, 1.0)))

    def volume(self, level: float) -> float:
        """Volume below ``level`` (0 <= level <= depth), unit diameter."""
        crown = self.crown
        if level <= self.crown_top:
            return math.pi * level**2 * (crown - level / 3.0)
        cap = math.pi * self.crown_top**2 * (crown - self.crown_top / 3.0)
        u = self.depth - level
        return cap + math.pi * (self._knuckle_antiderivative(self.u_junction) - self._knuckle_antiderivative(u))

    def area(self, level: float) -> float:
        """Wall area below ``level`` (0 <= level <= depth), unit diameter."""
        if level <= self.crown_top:
            return 2.0 * math.pi * self.crown * level
        cap = 2.0 * math.pi * self.crown * self.crown_top
        r, c = self.knuckle, self.offset
        sin_theta = min((self.depth - level) / r, 1.0)
        theta = math.asin(sin_theta)
        theta1 = self.theta_junction
        return cap + 2.0 * math.pi * r * (c * (theta1 - theta) + r * (math.sin(theta1) - sin_theta))


_TORISPHERES = {name: _Torisphere(*ratios) for name, ratios in BOTTOM_SHAPES.items() if ratios}


def _check_bottom(bottom: str) -> str:
    if bottom not in BOTTOM_SHAPES:
        raise ModelDomainError(
            f"unknown bottom shape {bottom!r}; accepted: {', '.join(sorted(BOTTOM_SHAPES))}",
            key="bottom",
        )
    return bottom






# Dimensionless (unit-diameter) shape functions ------------------------------------------------


def _unit_depth(bottom: str) -> float:
    if bottom == "flat":
        return 0.0
    if bottom == "elliptical":
        return _ELLIPSE_B
    return _TORISPHERES[bottom].depth


def _unit_head_volume(bottom: str) -> float:
    return _unit_volume_below(_unit_depth(bottom), bottom)


def _unit_head_area(bottom: str) -> float:
    return _unit_area_below(_unit_depth(bottom), bottom)


def _unit_volume_below(level: float, bottom: str) -> float:
    """Volume below ``level`` for a unit diameter (level may lie above the head)."""
    depth = _unit_depth(bottom)
    if level > depth:
        return _unit_volume_below(depth, bottom) + math.pi / 4.0 * (level - depth)
    if bottom == "flat":
        return 0.0
    if bottom == "elliptical":
        a, b = _ELLIPSE_A, _ELLIPSE_B
        return math.pi * a * a * (level**2 / b - level**3 / (3.0 * b * b))
    return _TORISPHERES[bottom].volume(level)


def _ellipse_zone_antiderivative(w: float) -> float:
    k = _ELLIPSE_K
    return 0.5 * (w * math.sqrt(1.0 + (k * w) ** 2) + math.asinh(k * w) / k)


def _unit_area_below(level: float, bottom: str) -> float:
    """Wall area below ``level`` for a unit diameter, bottom included (level may lie above the head)."""
    depth = _unit_depth(bottom)
    if level > depth:
        return _unit_area_below(depth, bottom) + math.pi * (level - depth)
    if bottom == "flat":
        return math.pi / 4.0  # the whole flat plate is wetted as soon as there is liquid
    if bottom == "elliptical":
        a, b = _ELLIPSE_A, _ELLIPSE_B
        y = b - level
        return 2.0 * math.pi * a * (_ellipse_zone_antiderivative(b) - _ellipse_zone_antiderivative(y))
    return _TORISPHERES[bottom].area(level)


def _unit_level_for_volume(unit_volume: float, bottom: str) -> float:
    """Invert the unit-diameter volume; brentq inside the head, closed form in the shell."""
    from scipy.optimize import brentq

    depth = _unit_depth(bottom)
    head = _unit_head_volume(bottom)
    if unit_volume >= head:
        return depth + (unit_volume - head) / (math.pi / 4.0)

    def residual(level: float) -> float:
        return _unit_volume_below(level, bottom) - unit_volume

    low, high = residual(0.0), residual(depth)
    if not (low < 0.0 < high):
        raise SolverError(
            f"liquid level bracket [0, {depth}] D does not enclose the fill volume "
            f"(residuals {low}, {high})",
            key="fill_volume",
        )
    return brentq(residual, 0.0, depth, xtol=1e-15, rtol=4.0 * np.finfo(float).eps, maxiter=200)


# Public API -------------------------------------------------------------------------------------


def head_volume(diameter, bottom: str):
    """Volume of the full bottom head.

    Parameters
    ----------
    diameter : float or array_like
        Inside diameter of the shell. [m]
    bottom : str
        ``"flat"``, ``"torispherical"`` (R = D, r = 0.1 D), ``"torispherical-0.8"``
        (R = 0.8 D, r = 0.154 D), ``"torispherical-asme"`` (R = D, r = 0.06 D) or
        ``"elliptical"`` (2:1). [text]

    Returns
    -------
    float or numpy.ndarray
        Head volume ``V_head = v_head(bottom) D^3``. [m^3]

    Notes
    -----
    2:1 ellipsoid: ``pi D^3/24`` (half of the spheroid volume 4/3 pi a^2 b). Torispherical: cap
    plus knuckle, see the module docstring (derived): 0.0990 D^3 for R = D, r = 0.1 D (handbooks
    round it to 0.1 D^3, from memory), 0.1308 D^3 for R = 0.8 D, r = 0.154 D, 0.0810 D^3 for
    R = D, r = 0.06 D (the "0.0809 D^3" of the flanged-and-dished head, from memory). Flat: 0.
    """
    _check_bottom(bottom)
    d = require_positive(diameter, "diameter")
    return scalar_or_array(_unit_head_volume(bottom) * d**3)


def head_depth(diameter, bottom: str):
    """Inside depth of the bottom head, from its apex to the tangent line with the shell.

    Parameters
    ----------
    diameter : float or array_like
        Inside diameter of the shell. [m]
    bottom : str
        Bottom shape, see :data:`BOTTOM_SHAPES`. [text]

    Returns
    -------
    float or numpy.ndarray
        Head depth. [m] Elliptical 2:1: ``D/4``; torispherical:
        ``h = R - sqrt((R - r)^2 - (D/2 - r)^2)`` (0.1938 D for R = D, r = 0.1 D; 0.2545 D for
        R = 0.8 D, r = 0.154 D); flat: 0.
    """
    _check_bottom(bottom)
    d = require_positive(diameter, "diameter")
    return scalar_or_array(_unit_depth(bottom) * d)


def head_inner_area(diameter, bottom: str):
    """Inside surface area of the full bottom head.

    Parameters
    ----------
    diameter : float or array_like
        Inside diameter of the shell. [m]
    bottom : str
        Bottom shape, see :data:`BOTTOM_SHAPES`. [text]

    Returns
    -------
    float or numpy.ndarray
        Head area. [m^2] Elliptical 2:1: half the oblate-spheroid surface,
        ``pi a^2 + (pi b^2/(2 e)) ln((1 + e)/(1 - e))`` = 1.0840 D^2; torispherical (R = D,
        r = 0.1 D): ``2 pi R z1 + 2 pi r (c theta1 + r sin theta1)`` = 0.9899 D^2; flat:
        ``pi D^2/4``.
    """
    _check_bottom(bottom)
    d = require_positive(diameter, "diameter")
    return scalar_or_array(_unit_head_area(bottom) * d**2)


def filled_volume(liquid_level, diameter, bottom: str):
    """Liquid volume below a level measured from the lowest inside point.

    Parameters
    ----------
    liquid_level : float or array_like
        Liquid height above the apex of the bottom. [m]
    diameter : float or array_like
        Inside diameter of the shell. [m]
    bottom : str
        Bottom shape, see :data:`BOTTOM_SHAPES`. [text]

    Returns
    -------
    float or numpy.ndarray
        ``V(z) = pi * integral_0^z r(s)^2 ds`` (closed forms in the module docstring). [m^3]
    """
    _check_bottom(bottom)
    level = require_positive(liquid_level, "liquid_level", allow_zero=True)
    d = require_positive(diameter, "diameter")
    level, d = np.broadcast_arrays(level, d)
    out = np.vectorize(lambda z, dd: _unit_volume_below(z / dd, bottom) * dd**3, otypes=[float])(level, d)
    return scalar_or_array(np.asarray(out))


def liquid_height(fill_volume, diameter, bottom: str):
    """Liquid height above the lowest inside point for a given fill volume.

    Parameters
    ----------
    fill_volume : float or array_like
        Liquid volume in the vessel. [m^3]
    diameter : float or array_like
        Inside diameter of the shell. [m]
    bottom : str
        Bottom shape, see :data:`BOTTOM_SHAPES`. [text]

    Returns
    -------
    float or numpy.ndarray
        Level z with ``V(z) = fill_volume``. [m] Above the head: ``z = h + (V - V_head)/(pi D^2/4)``;
        inside the head: root of the partial-head volume by Brent's method on the checked bracket
        [0, h].

    Raises
    ------
    ModelDomainError
        If the fill volume or the diameter is not positive.
    """
    _check_bottom(bottom)
    volume = require_positive(fill_volume, "fill_volume")
    d = require_positive(diameter, "diameter")
    volume, d = np.broadcast_arrays(volume, d)
    out = np.vectorize(lambda v, dd: _unit_level_for_volume(v / dd**3, bottom) * dd, otypes=[float])(volume, d)
    return scalar_or_array(np.asarray(out))


def fill_fraction(fill_volume, vessel_volume):
    """Fraction of the vessel volume occupied by liquid.

    Parameters
    ----------
    fill_volume : float or array_like
        Liquid volume. [m^3]
    vessel_volume : float or array_like
        Total (brim-full) inside volume of the vessel. [m^3]

    Returns
    -------
    float or numpy.ndarray
        ``fill_volume / vessel_volume``. [-]

    Raises
    ------
    ModelDomainError
        If a volume is not positive or the fill exceeds the vessel volume.
    """
    volume = require_positive(fill_volume, "fill_volume")
    total = require_positive(vessel_volume, "vessel_volume")
    fraction = volume / total
    if np.any(fraction > 1.0):
        raise ModelDomainError(
            f"fill volume exceeds the vessel volume (fill fraction {np.max(fraction):.4g}); accepted: <= 1",
            key="fill_volume",
        )
    return scalar_or_array(fraction)


def wetted_area(fill_volume, diameter, bottom: str, jacket_height=None, vessel_volume=None):
    """Wetted (and, with a jacket, cooled) inside wall area of head plus shell.

    Parameters
    ----------
    fill_volume : float or array_like
        Liquid volume. [m^3]
    diameter : float or array_like
        Inside diameter of the shell. [m]
    bottom : str
        Bottom shape, see :data:`BOTTOM_SHAPES`. [text]
    jacket_height : float or array_like, optional
        Height of the top of the jacket above the lowest inside point (the same datum as the
        liquid level); the jacket is assumed to cover the whole wall below it, bottom included.
        The area is counted up to ``min(liquid level, jacket_height)``. None: wetted area. [m]
    vessel_volume : float or array_like, optional
        Total inside volume; when given, a fill volume above it raises. [m^3]

    Returns
    -------
    float or numpy.ndarray
        ``A(z) = 2 pi * integral_0^z r(s) sqrt(1 + r'(s)^2) ds`` with closed forms per head (module
        docstring); in the shell ``A = A_head + pi D (z - h)``. [m^2]

    Raises
    ------
    ModelDomainError
        For non-positive sizes, an unknown bottom, or a fill volume above ``vessel_volume``.
    """
    _check_bottom(bottom)
    if vessel_volume is not None:
        fill_fraction(fill_volume, vessel_volume)
    level = np.asarray(liquid_height(fill_volume, diameter, bottom), dtype=float)
    if jacket_height is not None:
        level = np.minimum(level, require_positive(jacket_height, "jacket_height"))
    d = require_positive(diameter, "diameter")
    level, d = np.broadcast_arrays(level, d)
    out = np.vectorize(lambda z, dd: _unit_area_below(z / dd, bottom) * dd**2, otypes=[float])(level, d)
    return scalar_or_array(np.asarray(out))


def cylinder_height_for_volume(volume, diameter, bottom: str):
    """Straight-side (cylindrical shell) height that gives a nominal volume with the chosen bottom.

    Parameters
    ----------
    volume : float or array_like
        Nominal vessel volume, head included. [m^3]
    diameter : float or array_like
        Inside diameter of the shell. [m]
    bottom : str
        Bottom shape, see :data:`BOTTOM_SHAPES`. [text]

    Returns
    -------
    float or numpy.ndarray
        ``H = (V - V_head)/(pi D^2/4)``. [m]

    Raises
    ------
    ModelDomainError
        For non-positive sizes or a volume smaller than the head alone.
    """
    _check_bottom(bottom)
    v = require_positive(volume, "volume")
    d = require_positive(diameter, "diameter")
    remaining = v - _unit_head_volume(bottom) * d**3
    if np.any(remaining < 0.0):
        raise ModelDomainError("volume is smaller than the bottom head alone; accepted: >= head volume", key="volume")
    return scalar_or_array(remaining / (math.pi / 4.0 * d**2))


def similar_vessel(volume, aspect_ratio, bottom: str):
    """Diameter of a vessel of given volume in a geometrically similar family.

    Parameters
    ----------
    volume : float or array_like
        Nominal vessel volume, head included. [m^3]
    aspect_ratio : float or array_like
        Straight-side height over diameter, ``H/D``, held fixed across the family. [-]
    bottom : str
        Bottom shape, see :data:`BOTTOM_SHAPES`. [text]

    Returns
    -------
    float or numpy.ndarray
        ``D = (V / (pi (H/D)/4 + v_head))^(1/3)`` with ``v_head = V_head/D^3``. [m]

    Notes
    -----
    All lengths scale with D, so areas scale as D^2 ~ V^(2/3) and the specific area A/V falls as
    V^(-1/3) at a fixed fill fraction (derived; the basis of the cooling-capacity loss on scale-up).
    """
    _check_bottom(bottom)
    v = require_positive(volume, "volume")
    ratio = require_positive(aspect_ratio, "aspect_ratio")
    return scalar_or_array((v / (math.pi / 4.0 * ratio + _unit_head_volume(bottom))) ** (1.0 / 3.0))
