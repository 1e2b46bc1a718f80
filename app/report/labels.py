"""Finding numbers on the report's pictures: placed beside their markers, never over each other.

Each marker gets a number in a box beside it with a leader line from the box
to the marker. Boxes are placed greedily (the standard approach to point-feature
label placement: Christensen, Marks and Shieber, "An empirical study of
algorithms for point-feature label placement", ACM Transactions on Graphics 14(3),
1995, the greedy method of sec. 3): every candidate place of every label is
tested at once against the picture's edges, the areas kept free (the legend),
the markers and every other label's candidates; then the labels, the most
crowded first, each take their first candidate that no placed label blocks.
Markers on the same spot share one box (``13, 14``). A number that finds no
free place is left out of the picture and named in its caption: the findings
table lists every finding.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# Markers closer than this (pixels) share one box: they mark the same spot.
SAME_SPOT_PX = 9.0
# Leader lengths tried (pixels), shortest first, and directions round each marker (from upper right).
LEADERS = (14.0, 34.0, 60.0, 95.0, 140.0)
DIRECTIONS = 16
# Clear space kept round a box (pixels), and the radius of a marker's dot.
PAD = 3.0
DOT = 6.0
# Most numbered boxes in one picture: more would bury the model under labels.
MOST_LABELS = 40


@dataclass(frozen=True)
class Placed:
    """Labels placed in one picture.

    Attributes
    ----------
    anchors : ndarray of shape (k, 2)
        The markers (pixels, x right, y down) of the labels shown.
    boxes : ndarray of shape (k, 4)
        Their boxes: left, top, right, bottom.
    texts : list of str
    left_out : list of str
        Numbers that found no room, in reading order.
    """

    anchors: np.ndarray
    boxes: np.ndarray
    texts: list[str]
    left_out: list[str]


def same_spot(pixels: np.ndarray, numbers: list[str]) -> tuple[np.ndarray, list[str]]:
    """Markers on one spot joined: their first marker's place and the numbers joined (``"13, 14"``).

    Parameters
    ----------
    pixels : ndarray of shape (n, 2)
    numbers : list of str
        One per marker, in reading order.

    Returns
    -------
    anchors : ndarray of shape (m, 2)
    texts : list of str
    """
    pixels = np.asarray(pixels, float).reshape(-1, 2)
    near = np.linalg.norm(pixels[:, None, :] - pixels[None, :, :], axis=2) < SAME_SPOT_PX
    # a marker joins the first earlier marker on its spot (the boolean matrix's first True per row)
    first = np.argmax(near, axis=1)
    groups = list(dict.fromkeys(first.tolist()))
    return pixels[groups], [", ".join(numbers[j] for j in np.flatnonzero(first == g)) for g in groups]


def _candidates(anchors: np.ndarray, sizes: np.ndarray) -> np.ndarray:
    """Candidate boxes round each anchor, preferred first: shape (n, c, 4) (left, top, right, bottom).

    A box stands off its marker by the leader length, along the direction, with
    the box's nearer side or corner facing the marker.
    """
    angles = np.pi / 4 - np.arange(DIRECTIONS) * 2 * np.pi / DIRECTIONS
    unit = np.stack([np.cos(angles), -np.sin(angles)], axis=1)  # picture y runs down
    reach = np.repeat(np.asarray(LEADERS), DIRECTIONS)[:, None] * np.tile(unit, (len(LEADERS), 1))  # (c, 2)
    half = sizes[:, None, :] / 2  # (n, 1, 2)
    # the box's centre lies beyond the leader's end by half the box, along each axis in the leader's sense
    centre = anchors[:, None, :] + reach[None] + np.sign(reach)[None] * half
    return np.concatenate([centre - half, centre + half], axis=2)


def _overlap(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Whether boxes overlap (with :data:`PAD` between them), broadcast over leading axes."""
    return (
        (a[..., 0] < b[..., 2] + PAD)
        & (b[..., 0] < a[..., 2] + PAD)
        & (a[..., 1] < b[..., 3] + PAD)
        & (b[..., 1] < a[..., 3] + PAD)
    )


def _leaders(anchors: np.ndarray, boxes: np.ndarray) -> np.ndarray:
    """Leader lines from each anchor to the nearest point of each of its boxes: shape (..., 4) (x0, y0, x1, y1)."""
    ends = np.clip(anchors[..., None, :], boxes[..., :2], boxes[..., 2:])
    return np.concatenate([np.broadcast_to(anchors[..., None, :], ends.shape), ends], axis=-1)


def _crosses(lines: np.ndarray, boxes: np.ndarray) -> np.ndarray:
    """Whether segments pass through boxes, broadcast over leading axes (slab clipping, Liang and Barsky,
    "A new concept and method for line clipping", ACM Transactions on Graphics 3(1), 1984)."""
    start, step = lines[..., :2], lines[..., 2:] - lines[..., :2]
    with np.errstate(divide="ignore", invalid="ignore"):
        near = (boxes[..., :2] - start) / step
        far = (boxes[..., 2:] - start) / step
    low, high = np.minimum(near, far), np.maximum(near, far)
    # a segment parallel to a slab lies inside it or misses the box
    flat = step == 0
    inside = (start > boxes[..., :2]) & (start < boxes[..., 2:])
    low = np.where(flat, np.where(inside, -np.inf, np.inf), low)
    high = np.where(flat, np.where(inside, np.inf, -np.inf), high)
    enter, leave = np.maximum(low.max(axis=-1), 0.0), np.minimum(high.min(axis=-1), 1.0)
    return enter < leave


def place(
    anchors: np.ndarray, texts: list[str], sizes: np.ndarray, picture: tuple[int, int], keep_free: np.ndarray
) -> Placed:
    """Boxes for the labels beside their markers, overlapping nothing.

    Parameters
    ----------
    anchors : ndarray of shape (n, 2)
        Markers in pixels (x right, y down), one per label (:func:`same_spot` first).
    texts : list of str
    sizes : ndarray of shape (n, 2)
        Width and height of each label's box, pixels.
    picture : (int, int)
        Width and height.
    keep_free : ndarray of shape (f, 4)
        Boxes no label may cover (the legend), left, top, right, bottom.

    Returns
    -------
    Placed
    """
    anchors = np.asarray(anchors, float).reshape(-1, 2)
    width, height = picture
    inside = (anchors >= 0).all(axis=1) & (anchors[:, 0] <= width) & (anchors[:, 1] <= height)
    # the first MOST_LABELS markers in the picture are tried; the tests below grow with their square
    tried = np.flatnonzero(inside)[:MOST_LABELS]
    anchors, sizes = anchors[tried], np.asarray(sizes, float).reshape(-1, 2)[tried]
    boxes = _candidates(anchors, sizes)  # (n, c, 4)
    ok = (boxes[..., 0] >= PAD) & (boxes[..., 1] >= PAD) & (boxes[..., 2] <= width - PAD)
    ok &= boxes[..., 3] <= height - PAD
    free = np.asarray(keep_free, float).reshape(-1, 4)
    ok &= ~_overlap(boxes[:, :, None, :], free[None, None]).any(axis=2)
    dots = np.concatenate([anchors - DOT, anchors + DOT], axis=1)  # (n, 4)
    ok &= ~_overlap(boxes[:, :, None, :], dots[None, None]).any(axis=2)
    # clash[i, a, j, b]: candidate a of label i overlaps candidate b of label j (all pairs in one test)
    clash = _overlap(boxes[:, :, None, None, :], boxes[None, None, :, :, :])
    leaders = _leaders(anchors, boxes)  # (n, c, 4)
    n = tried.size
    choice = np.full(n, -1)
    blocked = np.zeros(ok.shape, bool)
    # the most crowded labels (fewest free candidates) choose first; reading order breaks ties
    for i in np.lexsort((np.arange(n), ok.sum(axis=1))):
        free_here = ok[i] & ~blocked[i]
        done = np.flatnonzero(choice >= 0)
        if done.size and free_here.any():
            # rather a place whose leader crosses no placed box and whose box covers no placed leader
            mine = _crosses(leaders[i][:, None], boxes[done, choice[done]][None]).any(axis=1)
            mine |= _crosses(leaders[done, choice[done]][None], boxes[i][:, None]).any(axis=1)
            if (free_here & ~mine).any():
                free_here &= ~mine
        free_here = np.flatnonzero(free_here)
        if free_here.size:
            choice[i] = free_here[0]
            blocked |= clash[i, choice[i]]
    placed = np.flatnonzero(choice >= 0)
    shown = set(tried[placed].tolist())
    return Placed(
        anchors[placed],
        boxes[placed, choice[placed]],
        [texts[tried[i]] for i in placed],
        [t for i, t in enumerate(texts) if i not in shown],
    )


def _segments_cross(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Whether segments (x0, y0, x1, y1) properly cross, broadcast over leading axes (the orientation
    test: each segment's ends lie on opposite sides of the other; de Berg et al., *Computational
    Geometry*, 3rd ed., sec. 2.1)."""

    def side(p, q, r):
        return (q[..., 0] - p[..., 0]) * (r[..., 1] - p[..., 1]) - (q[..., 1] - p[..., 1]) * (r[..., 0] - p[..., 0])

    p0, p1, q0, q1 = a[..., :2], a[..., 2:], b[..., :2], b[..., 2:]
    return (side(p0, p1, q0) * side(p0, p1, q1) < 0) & (side(q0, q1, p0) * side(q0, q1, p1) < 0)


def tangles(placed: Placed) -> int:
    """How many leader lines pass through another label's box or cross another leader (a picture's clutter)."""
    lines = _leaders(placed.anchors, placed.boxes[:, None, :])[:, 0]  # (k, 4)
    crossing = _crosses(lines[:, None], placed.boxes[None]) | _segments_cross(lines[:, None], lines[None])
    np.fill_diagonal(crossing, False)
    return int(crossing.any(axis=1).sum())


def draw(image: np.ndarray, placed: Placed, font_size: int, marker: str, box: str) -> np.ndarray:
    """The picture with the markers, leader lines and numbered boxes drawn on it (PIL).

    Parameters
    ----------
    image : ndarray of shape (h, w, 3), uint8
    placed : Placed
    font_size : int
        Pixels.
    marker, box : str
        ``#rrggbb`` colours of the marker dots and the boxes.
    """
    from PIL import Image, ImageDraw

    picture = Image.fromarray(np.ascontiguousarray(image))
    pen = ImageDraw.Draw(picture)
    font = label_font(font_size)
    # leader from the marker to the nearest point of its box
    ends = np.clip(placed.anchors, placed.boxes[:, :2], placed.boxes[:, 2:])
    for (ax, ay), (ex, ey) in zip(placed.anchors, ends, strict=True):
        pen.line([(ax, ay), (ex, ey)], fill="#202020", width=2)
    for ax, ay in placed.anchors:
        pen.ellipse([ax - DOT, ay - DOT, ax + DOT, ay + DOT], fill=marker, outline="#202020", width=2)
    for (left, top, right, bottom), text in zip(placed.boxes, placed.texts, strict=True):
        pen.rectangle([left, top, right, bottom], fill=box, outline="#202020", width=1)
        pen.text(((left + right) / 2, (top + bottom) / 2), text, fill="black", font=font, anchor="mm")
    return np.asarray(picture)


def label_font(font_size: int):
    """DejaVu Sans Bold (matplotlib's) at ``font_size`` pixels, PIL's own font if missing."""
    from pathlib import Path

    from PIL import ImageFont

    from app.render.legend import font_file

    path = font_file()
    bold = Path(path).with_name("DejaVuSans-Bold.ttf") if path else None
    if bold is not None and bold.is_file():
        return ImageFont.truetype(str(bold), font_size)
    return ImageFont.load_default(font_size)


def box_sizes(texts: list[str], font_size: int) -> np.ndarray:
    """Width and height (pixels) of each label's box: its text's extent and a margin, shape (n, 2)."""
    font = label_font(font_size)
    extents = np.array([font.getbbox(t, anchor="mm") for t in texts], float).reshape(-1, 4)
    return np.column_stack([extents[:, 2] - extents[:, 0] + 10.0, np.full(len(texts), font_size + 8.0)])
