"""Curvature versus arc length of the selected section, drawn with QPainter."""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QPainter, QPen, QPolygonF
from PySide6.QtWidgets import QSizePolicy, QWidget

from app.render.colours import COMB, EXTREMUM, INFLECTION
from geometry.conventions import CURVATURE_SIGN_SHORT
from geometry.sections import SectionCurve

MARGIN_LEFT, MARGIN_RIGHT, MARGIN_TOP, MARGIN_BOTTOM = 78, 12, 22, 34
TICKS = 6  # about this many labelled distances along the curve
# A curve bent less than this (1/mm, a radius of 10 km) is drawn flat: its rounding noise is not scaled up.
FLAT_CURVATURE = 1e-7


class CurvatureGraph(QWidget):
    """Signed curvature k(s) of one curve, with its zero line, inflections and extrema.

    The sign is the colour map's (:mod:`geometry.conventions`), stated in the plot.
    """

    def __init__(self, parent=None):
        super().__init__(parent)
        self.curve: SectionCurve | None = None
        self.title = ""
        self.setMinimumHeight(140)
        self.setSizePolicy(QSizePolicy.Policy.Expanding, QSizePolicy.Policy.Expanding)

    def set_curve(self, curve: SectionCurve | None, title: str = "") -> None:
        self.curve = curve
        self.title = title
        self.update()

    def _plot_rect(self) -> QRectF:
        return QRectF(
            MARGIN_LEFT,
            MARGIN_TOP,
            max(self.width() - MARGIN_LEFT - MARGIN_RIGHT, 10),
            max(self.height() - MARGIN_TOP - MARGIN_BOTTOM, 10),
        )

    def mapping(self):
        """Functions (s, k) -> widget coordinates for the current curve, and the k range."""
        s, k = self.curve.arc_length, self.curve.curvature
        reach = float(np.nanmax(np.abs(k))) if k.size else 0.0
        reach = max(reach, FLAT_CURVATURE) * 1.1
        length = max(float(s[-1]) if s.size else 1.0, 1e-9)
        rect = self._plot_rect()

        def to_x(values):
            return rect.left() + np.asarray(values) / length * rect.width()

        def to_y(values):
            return rect.center().y() - np.asarray(values) / reach * rect.height() / 2

        return to_x, to_y, reach, length

    def polyline(self) -> tuple[np.ndarray, np.ndarray]:
        """Widget coordinates of every point of the curve (none dropped), shapes (n,) and (n,)."""
        to_x, to_y, _, _ = self.mapping()
        return to_x(self.curve.arc_length), to_y(self.curve.curvature)

    def paintEvent(self, event):  # noqa: N802 - Qt's name
        painter = QPainter(self)
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        painter.fillRect(self.rect(), QColor("#fbfbf8"))
        rect = self._plot_rect()
        painter.setPen(QPen(QColor("#9a9a9a"), 1))
        painter.drawRect(rect)
        if self.curve is None or self.curve.arc_length.size < 2:
            painter.setPen(QColor("#555555"))
            painter.drawText(rect, Qt.AlignmentFlag.AlignCenter, "no section: turn the section tool on")
            return
        to_x, to_y, reach, length = self.mapping()
        painter.setPen(QPen(QColor("#b0b0b0"), 1, Qt.PenStyle.DashLine))
        zero = float(to_y(0.0))
        painter.drawLine(QPointF(rect.left(), zero), QPointF(rect.right(), zero))
        self._distance_ticks(painter, to_x, rect, length)
        xs, ys = self.polyline()
        # Qt takes points one object each; a curve has a few hundred
        polygon = QPolygonF([QPointF(x, y) for x, y in zip(xs.tolist(), ys.tolist(), strict=True)])
        painter.setPen(QPen(QColor(COMB), 1.6))
        painter.drawPolyline(polygon)
        marks = self.curve.inflections
        self._markers(painter, to_x, to_y, marks.arc_length, np.zeros(len(marks)), INFLECTION)
        self._markers(painter, to_x, to_y, self.curve.extrema.arc_length, self.curve.extrema.curvature, EXTREMUM)
        painter.setPen(QColor("#333333"))
        painter.drawText(QPointF(24, rect.top() + 10), f"{reach:.3g}")
        painter.drawText(QPointF(24, zero + 4), "0")
        painter.drawText(QPointF(24, rect.bottom()), f"{-reach:.3g}")
        painter.save()
        painter.translate(14, rect.center().y() + 45)
        painter.rotate(-90)
        painter.drawText(QPointF(0, 0), "curvature, 1/mm")
        painter.restore()
        painter.drawText(
            QPointF(rect.center().x() - 110, self.height() - 4), "distance along the curve from its start, mm"
        )
        painter.drawText(QPointF(rect.left(), 14), self.title)
        painter.setPen(QColor("#555555"))
        painter.drawText(QPointF(rect.left() + 6, rect.top() + 14), CURVATURE_SIGN_SHORT)
        self._key(painter, rect, len(self.curve.points))

    def _distance_ticks(self, painter, to_x, rect, length) -> None:
        """Faint vertical lines with their distances at round steps along the curve."""
        raw = length / TICKS
        step = 10 ** np.floor(np.log10(raw))
        step *= next(m for m in (1, 2, 5, 10) if m * step >= raw)
        for s in np.arange(0.0, length + 1e-9, step):
            x = float(to_x(s))
            painter.setPen(QPen(QColor("#e2e2dc"), 1))
            painter.drawLine(QPointF(x, rect.top()), QPointF(x, rect.bottom()))
            painter.setPen(QColor("#555555"))
            painter.drawText(QPointF(x - 8, rect.bottom() + 13), f"{s:g}")

    def _key(self, painter, rect, count: int) -> None:
        """What the markers mean, and how many points the line joins, top right."""
        metrics = painter.fontMetrics()
        items = ((INFLECTION, "inflection"), (EXTREMUM, "curvature extremum"), (None, f"{count} points on the line"))
        x = rect.right() - sum(metrics.horizontalAdvance(w) + 24 for _, w in items)
        for colour, words in items:
            if colour is not None:
                painter.setPen(QPen(QColor(colour), 2))
                painter.drawEllipse(QPointF(x, 10), 4, 4)
            painter.setPen(QColor("#333333"))
            painter.drawText(QPointF(x + 8, 14), words)
            x += metrics.horizontalAdvance(words) + 24

    @staticmethod
    def _markers(painter, to_x, to_y, s, k, colour) -> None:
        painter.setPen(QPen(QColor(colour), 2))
        for x, y in zip(to_x(s), to_y(k), strict=True):
            painter.drawEllipse(QPointF(x, y), 4, 4)
