"""Seam tolerances as plain numbers, and the classification of a measured seam.

The geometry layer never reads profile files: the application turns a profile
into a :class:`SeamTolerance` and hands it in.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

# Continuity classes, weakest first. "broken" = not even in position.
CLASSES = ("broken", "G0", "G1", "G2")
# A seam kinked by at least crease_deg less this band (degrees) along its whole
# length is a crease: far above the rounding of a measured angle (about 1e-9
# degrees) and of an exporter's chamfer (29.99999...), far below any designed
# difference between a crease and a seam that should be smooth (common practice).
CREASE_BAND_DEG = 0.01


@dataclass(frozen=True)
class SeamTolerance:
    """What a seam must achieve. The defaults are those of the shipped class-A profile.

    Attributes
    ----------
    name : str
        Profile name, echoed in every result.
    position_mm : float
        Largest gap for G0, mm.
    tangent_deg : float
        Largest angle between the normals for G1, degrees.
    curvature_relative : float
        Largest cross-seam normal curvature jump for G2, as a fraction of the
        larger of the two curvatures.
    flat_curvature_per_mm : float
        Curvatures below this (1/mm) count as flat: the relative jump is taken
        against at least this value, so two nearly flat sides do not fail on
        rounding noise.
    required : str
        The class every seam must reach: ``"G0"``, ``"G1"`` or ``"G2"``.
    crease_deg : float or None
        A seam whose normals differ by at least this (less
        :data:`CREASE_BAND_DEG`, so rounding cannot tip it) everywhere along it
        is a designed crease (a sharp edge): it only has to meet in position.
        ``None``: no seam counts as a crease.
    source : str
        Where the profile came from (a file path, or "built-in").
    """

    name: str = "class-a"
    position_mm: float = 0.01
    tangent_deg: float = 0.1
    curvature_relative: float = 0.05
    flat_curvature_per_mm: float = 1e-6
    required: str = "G2"
    crease_deg: float | None = 30.0
    source: str = "built-in defaults (common practice, no published source)"

    def __post_init__(self):
        if self.required not in CLASSES[1:]:
            raise ValueError(f"required continuity must be one of G0, G1, G2, got {self.required!r}")
        for key in ("position_mm", "tangent_deg", "curvature_relative", "flat_curvature_per_mm"):
            value = getattr(self, key)
            if not (isinstance(value, int | float) and value > 0):
                raise ValueError(f"{key} must be a positive number, got {value!r}")
        if self.crease_deg is not None and not 0 < self.crease_deg <= 180:
            raise ValueError(f"crease_deg must be in (0, 180], got {self.crease_deg!r}")

    def as_dict(self) -> dict:
        return asdict(self)


@dataclass(frozen=True)
class Classification:
    """Achieved class and verdict of one seam.

    Attributes
    ----------
    continuity : str
        One of :data:`CLASSES`.
    verdict : str
        ``"pass"`` or ``"fail"``.
    crease : bool
        The seam counts as a designed crease.
    reasons : tuple of str
        Each tolerance exceeded, in words.
    """

    continuity: str
    verdict: str
    crease: bool
    reasons: tuple[str, ...]


def classify(
    gap_max: float, angle_max: float, angle_min: float, jump_rel_max: float, tol: SeamTolerance
) -> Classification:
    """Continuity class and verdict from the worst values of a seam.

    Parameters
    ----------
    gap_max : float
        mm.
    angle_max, angle_min : float
        Largest and smallest angle between the normals along the seam, degrees.
    jump_rel_max : float
        Largest relative cross-seam curvature jump (fraction).
    tol : SeamTolerance

    Returns
    -------
    Classification

    Notes
    -----
    G0: gap within ``position_mm``; G1: also the angle within ``tangent_deg``;
    G2: also the relative curvature jump within ``curvature_relative``. A
    crease is a seam whose smallest angle reaches ``crease_deg`` within
    :data:`CREASE_BAND_DEG`; it only has to be G0. For two
    surfaces already G1 along a curve, equal normal curvature across it is
    enough for curvature continuity (the linkage-curve theorem of Pegna and
    Wolter, J. Mech. Des. 114, 1992; cited from memory).
    """
    exceeded = []  # (class the excess denies, words)
    g0 = gap_max <= tol.position_mm
    if not g0:
        exceeded.append(("G0", f"gap {gap_max:.4g} mm > {tol.position_mm:g} mm"))
    if angle_max > tol.tangent_deg:
        exceeded.append(("G1", f"angle {angle_max:.4g} deg > {tol.tangent_deg:g} deg"))
    if jump_rel_max > tol.curvature_relative:
        exceeded.append(("G2", f"curvature jump {100 * jump_rel_max:.4g} % > {100 * tol.curvature_relative:g} %"))
    g1 = g0 and angle_max <= tol.tangent_deg
    g2 = g1 and jump_rel_max <= tol.curvature_relative
    continuity = "G2" if g2 else "G1" if g1 else "G0" if g0 else "broken"
    crease = tol.crease_deg is not None and angle_min >= tol.crease_deg - CREASE_BAND_DEG
    required = "G0" if crease else tol.required
    rank = CLASSES.index(required)
    passed = CLASSES.index(continuity) >= rank
    reasons = () if passed else tuple(words for cls, words in exceeded if CLASSES.index(cls) <= rank)
    return Classification(continuity, "pass" if passed else "fail", bool(crease), reasons)
