"""Picking a pull direction: the model's principal axes, or the axis with the least area out of draft."""

from __future__ import annotations

import numpy as np


def principal_axes(points: np.ndarray, weights: np.ndarray) -> np.ndarray:
    """Principal axes of an area-weighted point set, thinnest first.

    Parameters
    ----------
    points : ndarray of shape (k, 3)
    weights : ndarray of shape (k,)
        Area each point stands for.

    Returns
    -------
    axes : ndarray of shape (3, 3)
        Unit rows, by increasing spread (the first is the direction the part is
        thinnest along, the usual pull of a shell); each turned so that its
        largest component is positive.

    Notes
    -----
    Eigenvectors of the weighted covariance matrix (principal component
    analysis; Jolliffe, *Principal Component Analysis*, 2nd ed., 2002, sec. 1.1).
    """
    w = np.asarray(weights, float)
    total = w.sum() or 1.0
    centre = (points * w[:, None]).sum(axis=0) / total
    rel = points - centre
    cov = (rel * w[:, None]).T @ rel / total
    _, vectors = np.linalg.eigh(cov)  # ascending eigenvalues
    axes = vectors.T.copy()
    flip = axes[np.arange(3), np.argmax(np.abs(axes), axis=1)] < 0
    axes[flip] *= -1.0
    return axes


def area_out_of_draft(normals: np.ndarray, weights: np.ndarray, candidates: np.ndarray, minimum: float) -> np.ndarray:
    """Area with |draft| below ``minimum`` degrees for each candidate pull, shape (c,).

    Parameters
    ----------
    normals : ndarray of shape (k, 3)
        Unit normals (NaN rows count as out of draft).
    weights : ndarray of shape (k,)
        Area of each sample, mm^2.
    candidates : ndarray of shape (c, 3)
        Unit directions.
    minimum : float
        Degrees.
    """
    sines = np.abs(np.nan_to_num(normals) @ candidates.T)  # (k, c)
    return weights @ (sines < np.sin(np.radians(minimum)))


def least_out_of_draft(normals: np.ndarray, weights: np.ndarray, points: np.ndarray, minimum: float) -> np.ndarray:
    """The world or principal axis with the least area out of draft, shape (3,).

    Parameters
    ----------
    normals, points : ndarray of shape (k, 3)
    weights : ndarray of shape (k,)
    minimum : float
        Degrees; a zero limit counts the walls exactly parallel to the axis.

    Returns
    -------
    pull : ndarray of shape (3,)
        Unit vector; the first candidate wins a tie (x, y, z, then the principal axes).
    """
    candidates = np.concatenate([np.eye(3), principal_axes(points, weights)])
    area = area_out_of_draft(normals, weights, candidates, max(minimum, 1e-6))
    return candidates[int(np.argmin(area))]
