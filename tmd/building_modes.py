"""The whole building as the n-mode engine sees it: modes, plan, points and dampers.

Plan axes x, y are fixed to the building, z is up; rotation theta is about z,
positive anticlockwise seen from above, about the plan origin (x0, y0). Every
mode's shape has unit largest component (sway components in m per unit modal
coordinate, rotation in rad), and its generalised mass is referred to that
normalisation: kg for a mode whose largest component is a sway, kg m^2 for
one whose largest component is the rotation. A point (x, y) at height z moves

    u_x = sum_i q_i (phi_x,i(z) - phi_theta,i(z) (y - y0)),
    u_y = sum_i q_i (phi_y,i(z) + phi_theta,i(z) (x - x0)),

so a damper axis at a point, along x or y, has the participation vector of
those coefficients, and a damper off the centre of rotation couples to
torsion through the same lever arm. A mode's effective mass ratio for a
damper of mass m_d at p along a direction is mu_i = m_d phi_i(p)^2 / M*_i.

A damper acting along both plan directions (a bidirectional pendulum, or a
platform carrying two orthogonal tuned masses) is two absorber axes with the
same mass and independent tunings; its mass is a point mass (its own
rotational inertia about z is neglected).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.modal_response import OutputRows

AXES = ("x", "y", "both")
# A shape normalised "to unit largest component" is accepted within this
# tolerance, so that tables printed to 4-6 digits are not rejected.
UNIT_COMPONENT_RTOL = 1e-3


@dataclass(frozen=True)
class ModeShape:
    """A mode shape over height: sway x, sway y [m/m] and rotation [rad] components.

    Parameters
    ----------
    heights_m : tuple of float
        Strictly increasing heights [m]; for a power law (0, height).
    x, y, theta : tuple of float
        Components at those heights [-], [-], [rad]; linear in between.
    exponent : float or None
        For a power law phi(z) = c (z / H)^k: k [-]; the tuple values are then
        the components c at the top (heights (0, H)).
    """

    heights_m: tuple[float, ...]
    x: tuple[float, ...]
    y: tuple[float, ...]
    theta: tuple[float, ...]
    exponent: float | None = None

    @classmethod
    def power_law(cls, height_m: float, exponent: float, x: float, y: float,
                  theta: float) -> ModeShape:
        """phi(z) = (x, y, theta) (z / H)^k.

        Parameters
        ----------
        height_m : float
            Building height H [m].
        exponent : float
            k [-] (EN 1991-1-4 F.3 uses 0.6 to 2.0 for sway, from memory).
        x, y, theta : float
            Components at the top [-], [-], [rad].

        Returns
        -------
        ModeShape
        """
        return cls((0.0, float(height_m)), (0.0, x), (0.0, y), (0.0, theta), float(exponent))

    @property
    def breakpoints_m(self) -> tuple[float, ...]:
        """Heights [m] where the shape may have a kink: a table's heights, none for a power law."""
        return self.heights_m if self.exponent is None else ()

    def values(self, height_m) -> np.ndarray:
        """Components (phi_x, phi_y, phi_theta) at the given heights.

        Parameters
        ----------
        height_m : float or array
            z [m], inside the shape's height range.

        Returns
        -------
        array, shape np.shape(height_m) + (3,)
        """
        z = np.asarray(height_m, dtype=float)
        if self.exponent is not None:
            top = self.heights_m[-1]
            scale = (z / top) ** self.exponent
            return np.stack([scale * self.x[-1], scale * self.y[-1], scale * self.theta[-1]],
                            axis=-1)
        return np.stack([np.interp(z, self.heights_m, c) for c in (self.x, self.y, self.theta)],
                        axis=-1)

    def largest_component(self) -> tuple[str, float]:
        """Return the name and value of the largest |component| over the height.

        Returns
        -------
        name : str
            "x", "y" or "theta".
        value : float
            The signed component: [-] for a sway, [rad] for the rotation.
        """
        best = max(((name, value) for name, column in
                    (("x", self.x), ("y", self.y), ("theta", self.theta)) for value in column),
                   key=lambda item: abs(item[1]))
        return best


@dataclass(frozen=True)
class BuildingMode:
    """One mode of the building.

    Parameters
    ----------
    name : str
        What the engineer calls it ("x-sway 1").
    frequency_hz : float
        f_i [Hz].
    damping_ratio : float
        zeta_i [-].
    generalised_mass : float
        M*_i in the shape's normalisation [kg; kg m^2 when the largest
        component is the rotation].
    shape : ModeShape
        The mode shape.
    """

    name: str
    frequency_hz: float
    damping_ratio: float
    generalised_mass: float
    shape: ModeShape

    @property
    def is_torsional(self) -> bool:
        """True when the shape's largest component is the rotation."""
        return self.shape.largest_component()[0] == "theta"


@dataclass(frozen=True)
class PlanPoint:
    """A named point of the plan where acceleration is judged.

    Parameters
    ----------
    name : str
        The point's name.
    x_m, y_m : float
        Plan coordinates [m].
    """

    name: str
    x_m: float
    y_m: float


@dataclass(frozen=True)
class Plan:
    """The rectangular plan, its origin of rotation and the evaluation height.

    Parameters
    ----------
    x_min_m, x_max_m, y_min_m, y_max_m : float
        Plan extent [m].
    origin_x_m, origin_y_m : float
        (x0, y0), the point the mode shapes' rotation refers to [m].
    height_m : float
        Building height [m].
    evaluation_height_m : float
        Height of the floor where acceleration is judged [m].
    points : tuple of PlanPoint
        Evaluation points (the four corners by default).
    """

    x_min_m: float
    x_max_m: float
    y_min_m: float
    y_max_m: float
    origin_x_m: float
    origin_y_m: float
    height_m: float
    evaluation_height_m: float
    points: tuple[PlanPoint, ...]

    def contains(self, x_m: float, y_m: float) -> bool:
        """Tell whether (x, y) lies in the plan (boundary included).

        Parameters
        ----------
        x_m, y_m : float
            Plan coordinates [m].

        Returns
        -------
        bool
        """
        return self.x_min_m <= x_m <= self.x_max_m and self.y_min_m <= y_m <= self.y_max_m

    @staticmethod
    def corners(x_min_m, x_max_m, y_min_m, y_max_m) -> tuple[PlanPoint, ...]:
        """Return the four corners, named by their side of each axis.

        Parameters
        ----------
        x_min_m, x_max_m, y_min_m, y_max_m : float
            Plan extent [m].

        Returns
        -------
        tuple of PlanPoint
        """
        return (PlanPoint("corner -x -y", x_min_m, y_min_m),
                PlanPoint("corner +x -y", x_max_m, y_min_m),
                PlanPoint("corner +x +y", x_max_m, y_max_m),
                PlanPoint("corner -x +y", x_min_m, y_max_m))


@dataclass(frozen=True)
class DamperPlacement:
    """A damper's place, its axes and its share of the total damper mass.

    Parameters
    ----------
    name : str
        The damper's name.
    x_m, y_m, height_m : float
        Where it sits [m].
    axes : str
        "x", "y" or "both" (bidirectional: same mass, independent tunings).
    mass_share : float
        Its fraction of the total damper mass [-]; shares add up to 1.
    max_stroke_m : float or None
        Peak stroke limit on each axis and on the resultant plan stroke [m].
    """

    name: str
    x_m: float
    y_m: float
    height_m: float
    axes: str
    mass_share: float
    max_stroke_m: float | None = None

    @property
    def directions(self) -> tuple[str, ...]:
        """The plan directions it acts along."""
        return ("x", "y") if self.axes == "both" else (self.axes,)


# Heights at which a mass distribution's integrals are evaluated (trapezoidal
# rule on a table's rows and this many equal steps; both integrands are
# piecewise linear or smooth, so 400 steps give ~1e-6).
MASS_INTEGRATION_STEPS = 400


@dataclass(frozen=True)
class MassDistribution:
    """The building's mass per height, for base moments.

    Parameters
    ----------
    heights_m : tuple of float
        Strictly increasing heights from 0 to the building height [m].
    mass_per_length_kg_m : tuple of float
        Mass per unit height m(z) there [kg/m]; linear in between.
    inertia_per_length_kg_m : tuple of float or None
        Mass moment of inertia about the vertical axis per unit height I(z)
        [kg m^2/m]; needed for the base torque.

    Notes
    -----
    The mass centre of every floor is taken at the plan origin (the centre
    the mode shapes' rotation refers to).
    """

    heights_m: tuple[float, ...]
    mass_per_length_kg_m: tuple[float, ...]
    inertia_per_length_kg_m: tuple[float, ...] | None = None

    def base_coefficients(self, modes: tuple[BuildingMode, ...]) -> tuple[np.ndarray, tuple]:
        """Return the base overturning moments and torque per unit modal coordinate.

        Parameters
        ----------
        modes : tuple of BuildingMode
            The modes (their shapes in the unit-largest-component normalisation).

        Returns
        -------
        rows : array, shape (k, n)
            Row 0: moment about the x axis from the y-sway forces,
            omega_i^2 int m phi_y,i z dz; row 1: moment about the y axis from
            the x-sway forces, omega_i^2 int m phi_x,i z dz [N m per unit
            modal coordinate]; row 2 (with the inertia): the torque
            omega_i^2 int I phi_theta,i dz [N m].
        names : tuple of str
            "base moment about x", "base moment about y" (, "base torque").

        Notes
        -----
        The elastic forces of mode i are K phi_i q_i = omega_i^2 M phi_i q_i
        (the mode's defining property: mass-orthogonal, K phi = omega^2 M
        phi), so the base moment is the sum over the modes of omega_i^2 q_i
        times the first moment of m phi_i (the modal superposition of
        equivalent static forces; e.g. Chopra, Dynamics of Structures, the
        modal base overturning moment, from memory). Forces of the modes
        left out are not included.
        """
        z = np.unique(np.concatenate([self.heights_m, np.linspace(
            self.heights_m[0], self.heights_m[-1], MASS_INTEGRATION_STEPS + 1)]))
        mass = np.interp(z, self.heights_m, self.mass_per_length_kg_m)
        rows, names = [], ["base moment about x", "base moment about y"]
        for mode in modes:
            phi = mode.shape.values(z)
            omega2 = (2.0 * math.pi * mode.frequency_hz) ** 2
            row = [omega2 * np.trapezoid(mass * phi[:, 1] * z, z),
                   omega2 * np.trapezoid(mass * phi[:, 0] * z, z)]
            if self.inertia_per_length_kg_m is not None:
                inertia = np.interp(z, self.heights_m, self.inertia_per_length_kg_m)
                row.append(omega2 * np.trapezoid(inertia * phi[:, 2], z))
            rows.append(row)
        if self.inertia_per_length_kg_m is not None:
            names.append("base torque")
        return np.array(rows).T, tuple(names)


@dataclass(frozen=True)
class BuildingModel:
    """Modes, plan and damper placements: what the n-mode response needs.

    Parameters
    ----------
    modes : tuple of BuildingMode
        The governing modes.
    plan : Plan
        Plan geometry and evaluation points.
    dampers : tuple of DamperPlacement
        Where the dampers sit (may be empty).
    mass : MassDistribution or None
        The mass per height, when the case gives it (base moments need it).
    """

    modes: tuple[BuildingMode, ...]
    plan: Plan
    dampers: tuple[DamperPlacement, ...] = ()
    mass: MassDistribution | None = None

    @property
    def frequency_hz(self) -> np.ndarray:
        """Modal frequencies, shape (n,) [Hz]."""
        return np.array([m.frequency_hz for m in self.modes])

    @property
    def generalised_mass(self) -> np.ndarray:
        """Generalised masses, shape (n,) [kg or kg m^2]."""
        return np.array([m.generalised_mass for m in self.modes])

    @property
    def damping_ratio(self) -> np.ndarray:
        """Modal damping ratios, shape (n,) [-]."""
        return np.array([m.damping_ratio for m in self.modes])

    def motion_coefficients(self, x_m: float, y_m: float, height_m: float) -> np.ndarray:
        """Coefficients of u_x and u_y at a point on the modal coordinates.

        Parameters
        ----------
        x_m, y_m, height_m : float
            The point [m].

        Returns
        -------
        array, shape (2, n)
            Row 0: phi_x,i - phi_theta,i (y - y0); row 1: phi_y,i +
            phi_theta,i (x - x0) [m per unit modal coordinate].
        """
        phi = np.array([m.shape.values(height_m) for m in self.modes])
        dx, dy = x_m - self.plan.origin_x_m, y_m - self.plan.origin_y_m
        return np.array([phi[:, 0] - phi[:, 2] * dy, phi[:, 1] + phi[:, 2] * dx])

    def torsional_coefficients(self, x_m: float, y_m: float, height_m: float) -> np.ndarray:
        """Return the rotation's part of :meth:`motion_coefficients`, shape (2, n).

        Parameters
        ----------
        x_m, y_m, height_m : float
            The point [m].

        Returns
        -------
        array
            Row 0: -phi_theta,i (y - y0); row 1: phi_theta,i (x - x0).
        """
        phi = np.array([m.shape.values(height_m) for m in self.modes])
        dx, dy = x_m - self.plan.origin_x_m, y_m - self.plan.origin_y_m
        return np.array([-phi[:, 2] * dy, phi[:, 2] * dx])

    def axes(self) -> list[tuple[int, str]]:
        """Return the absorber axes in engine order.

        Returns
        -------
        list of (int, str)
            (damper index, direction "x" or "y") of each axis.
        """
        return [(j, d) for j, damper in enumerate(self.dampers) for d in damper.directions]

    def participation(self) -> np.ndarray:
        """Return the participation vectors of every absorber axis.

        Returns
        -------
        numpy.ndarray, shape (N, n)
            Motion of axis j's direction at its damper per unit modal
            coordinate of mode i [-] (the mode shapes at the dampers).
        """
        rows = []
        for j, direction in self.axes():
            d = self.dampers[j]
            rows.append(self.motion_coefficients(d.x_m, d.y_m, d.height_m)["xy".index(direction)])
        return np.array(rows).reshape(-1, len(self.modes))

    def effective_mass_ratios(self, total_mass_kg: float) -> np.ndarray:
        """mu_i = m_d phi_i(p)^2 / M*_i per axis and mode, shape (N, n) [-].

        Parameters
        ----------
        total_mass_kg : float
            Total damper mass, shared by the dampers' mass shares [kg].

        Returns
        -------
        array
        """
        shares = np.array([self.dampers[j].mass_share for j, _ in self.axes()])
        return (total_mass_kg * shares)[:, None] * self.participation() ** 2 \
            / self.generalised_mass

    def output_rows(self) -> OutputRows:
        """Every output of a building assessment, in a fixed order.

        Returns
        -------
        OutputRows
            Per point: a_x, a_y, then their torsional parts (acceleration,
            order 2); per axis: stroke r_a (order 0); per axis: internal
            force p_a (order 0).
        """
        n, count = len(self.modes), len(self.axes())
        width = n + 2 * count
        rows, order, names = [], [], []
        z = self.plan.evaluation_height_m
        for point in self.plan.points:
            total = self.motion_coefficients(point.x_m, point.y_m, z)
            torsion = self.torsional_coefficients(point.x_m, point.y_m, z)
            for label, coeffs in (("", total), ("torsion ", torsion)):
                for k, direction in enumerate("xy"):
                    row = np.zeros(width)
                    row[:n] = coeffs[k]
                    rows.append(row)
                    order.append(2)
                    names.append(f"{point.name}: {label}a_{direction}")
        for offset, what in ((n, "stroke"), (n + count, "force")):
            for a, (j, direction) in enumerate(self.axes()):
                row = np.zeros(width)
                row[offset + a] = 1.0
                rows.append(row)
                order.append(0)
                names.append(f"{self.dampers[j].name} {direction}: {what}")
        return OutputRows(np.array(rows).reshape(-1, width), order, tuple(names))


def unit_component_problem(shape: ModeShape) -> str:
    """'' when the shape's largest |component| is 1 (within 1e-3), else the problem.

    Parameters
    ----------
    shape : ModeShape
        The mode shape.

    Returns
    -------
    str
    """
    name, value = shape.largest_component()
    if math.isclose(abs(value), 1.0, rel_tol=UNIT_COMPONENT_RTOL):
        return ""
    return (f"the largest shape component is {name} = {value:g}; shapes must be normalised to "
            "unit largest component (and the generalised mass referred to that normalisation)")
