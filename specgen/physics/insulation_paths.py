"""Creepage and clearance paths of a wound part's geometry: over a wall, round a ring.

Pure geometry in SI metres. The paths follow the rules for measuring creepage distances and clearances of
IEC 60664-1:2007 Annex A (from memory: verify against the standard): a creepage distance follows the
surface, up one face of a rib or wall, across its top and down the other; a clearance is the shortest path
through air, which may cut across a corner or an open hole but not through solid insulation.

References
----------
IEC 60664-1:2007, Annex A, methods of measuring creepage distances and clearances (examples of a rib and of
a path round an obstacle), from memory. The ring geometry is elementary plane geometry (the shortest path
in a plane round a disc: the two tangent segments and the arc between them).
"""

from __future__ import annotations

import math


def over_wall_creepage_m(margin_a_m: float, build_a_m: float, margin_b_m: float, build_b_m: float,
                         wall_height_m: float, wall_thickness_m: float) -> float:
    """Creepage distance between two windings either side of a wall (a split bobbin's divider).

    From the top corner of winding A's end turn (``margin_a_m`` from the wall, ``build_a_m`` above the tube)
    along the surface to the wall, up the wall to its top, across the top and down to winding B::

        d = m_a + max(0, H - h_a) + t + max(0, H - h_b) + m_b

    A winding built higher than the wall leaves nothing of the wall above it on that side.

    Parameters
    ----------
    margin_a_m, margin_b_m : each winding's gap from its copper to the wall along the tube [m]
    build_a_m, build_b_m : each winding's copper height above the tube [m]
    wall_height_m : the wall's height above the tube [m]
    wall_thickness_m : the wall's thickness [m]

    References
    ----------
    IEC 60664-1:2007 Annex A, a creepage path over a rib (from memory).
    """
    return (margin_a_m + max(0.0, wall_height_m - build_a_m) + wall_thickness_m
            + max(0.0, wall_height_m - build_b_m) + margin_b_m)


def over_wall_clearance_m(margin_a_m: float, build_a_m: float, margin_b_m: float, build_b_m: float,
                          wall_height_m: float, wall_thickness_m: float) -> float:
    """Clearance between two windings either side of a wall: the shortest air path over its top.

    A straight line from each winding's top corner to the wall's top corner on its side, and across the
    top: ``sqrt(m_a^2 + (H - h_a)^2) + t + sqrt(m_b^2 + (H - h_b)^2)``, where a winding built higher than
    the wall goes straight across (``H - h`` taken as zero).

    Parameters and reference as ``over_wall_creepage_m``.
    """
    rise_a = max(0.0, wall_height_m - build_a_m)
    rise_b = max(0.0, wall_height_m - build_b_m)
    return math.hypot(margin_a_m, rise_a) + wall_thickness_m + math.hypot(margin_b_m, rise_b)


def ring_face_path_m(outer_radius_m: float, inner_radius_m: float, angle_rad: float) -> float:
    """Shortest path on the flat face of a ring between two points on its outer edge ``angle_rad`` apart.

    A straight chord ``2 R sin(theta/2)`` where it clears the hole (``R cos(theta/2) >= r``); else two
    tangent segments to the hole and the arc of the hole between them:
    ``2 sqrt(R^2 - r^2) + r (theta - 2 acos(r/R))``. Used for a toroid's lead exits: the creepage
    across the wound ring's end face (never longer than the arc ``R theta`` round its outside).

    Parameters
    ----------
    outer_radius_m : the ring's outer radius R (over the winding) [m]
    inner_radius_m : the hole's radius r (the bore left inside the winding) [m]
    angle_rad : the angle between the two points [rad] (the shorter way round is taken)

    References
    ----------
    Plane geometry: the shortest path round a convex obstacle follows tangents and the obstacle's boundary.
    """
    if not 0.0 <= inner_radius_m < outer_radius_m:
        raise ValueError("a ring needs 0 <= inner radius < outer radius")
    theta = min(abs(angle_rad) % (2.0 * math.pi), 2.0 * math.pi - abs(angle_rad) % (2.0 * math.pi))
    if outer_radius_m * math.cos(theta / 2.0) >= inner_radius_m:
        return 2.0 * outer_radius_m * math.sin(theta / 2.0)
    tangent = math.sqrt(outer_radius_m ** 2 - inner_radius_m ** 2)
    return 2.0 * tangent + inner_radius_m * (theta - 2.0 * math.acos(inner_radius_m / outer_radius_m))


def chord_m(radius_m: float, angle_rad: float) -> float:
    """Straight-line distance between two points on a circle of ``radius_m``, ``angle_rad`` apart
    (a toroid's lead exits: their clearance through air, which may cross the open bore).

    References
    ----------
    Plane geometry: chord = 2 R sin(theta / 2).
    """
    return 2.0 * radius_m * abs(math.sin(angle_rad / 2.0))
