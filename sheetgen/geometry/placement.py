"""Placements: rigid transforms from a part's own plane into the kit frame.

The kit frame has its origin on the axle axis, x along the axle, z up when the
panel faces the zenith; the turning frame turns about x.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from sheetgen.errors import GeometryBug

Vec3 = tuple[float, float, float]
Mat3 = tuple[Vec3, Vec3, Vec3]  # row by row


@dataclass(frozen=True)
class Placement:
    """Rigid transform part-local -> kit frame: p_kit = R @ p_local + t.

    ``rotation`` is a 3x3 rotation matrix stored row by row. ``rotating`` says
    whether this instance turns with the panel frame about the axle (x).
    """

    rotation: Mat3
    translation_mm: Vec3
    rotating: bool = False

    @property
    def matrix(self) -> np.ndarray:
        return np.array(self.rotation, dtype=float)

    def apply(self, points_mm: np.ndarray) -> np.ndarray:
        """Map local points (N, 3) into the kit frame."""
        pts = np.asarray(points_mm, dtype=float).reshape(-1, 3)
        return pts @ self.matrix.T + np.asarray(self.translation_mm, dtype=float)

    def turned(self, angle_deg: float) -> "Placement":
        """This placement after the rotating frame turns by ``angle_deg`` about x.

        Fixed placements are returned unchanged."""
        if not self.rotating:
            return self
        rx = rotation_x(angle_deg)
        r = rx @ self.matrix
        t = rx @ np.asarray(self.translation_mm, dtype=float)
        return Placement(_mat_tuple(r), vec_tuple(t), True)


def _mat_tuple(m: np.ndarray) -> Mat3:
    return mat3(np.where(np.abs(m) < 1e-15, 0.0, m))


def vec3(v: Sequence[float] | np.ndarray) -> Vec3:
    """Three plain floats from any sequence of three numbers (a numpy vector, a tuple)."""
    x, y, z = v
    return (float(x), float(y), float(z))


def mat3(m: Sequence[Sequence[float]] | np.ndarray) -> Mat3:
    """A 3x3 matrix as three rows of plain floats."""
    r0, r1, r2 = m
    return (vec3(r0), vec3(r1), vec3(r2))


def vec_tuple(v: np.ndarray) -> Vec3:
    return vec3(v)


def rotation_x(angle_deg: float) -> np.ndarray:
    """Right-handed rotation about the kit x axis (the axle)."""
    a = math.radians(angle_deg)
    c, s = math.cos(a), math.sin(a)
    return np.array([[1.0, 0.0, 0.0], [0.0, c, -s], [0.0, s, c]])


def place(u: tuple[float, float, float], v: tuple[float, float, float], origin_mm: tuple[float, float, float],
          rotating: bool = False) -> Placement:
    """Placement whose local x axis points along ``u`` and local y along ``v``
    (both unit vectors in the kit frame, orthogonal); local z is u x v, the
    direction of the sheet thickness."""
    u_ = np.asarray(u, dtype=float)
    v_ = np.asarray(v, dtype=float)
    w_ = np.cross(u_, v_)
    if abs(np.dot(u_, v_)) > 1e-12 or abs(np.linalg.norm(u_) - 1) > 1e-12 or abs(np.linalg.norm(v_) - 1) > 1e-12:
        raise GeometryBug("place(): u and v must be orthogonal unit vectors")
    r = np.column_stack([u_, v_, w_])
    return Placement(_mat_tuple(r), vec_tuple(np.asarray(origin_mm, dtype=float)), rotating)
