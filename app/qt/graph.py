"""Curvature versus arc length of the selected section, drawn with QPainter."""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QPainter, QPen, QPolygonF
from PySide6.QtWidgets import QSizePolicy, QWidget

from geometry.section_results import SectionCurve

MARGIN_LEFT, MARGIN_RIGHT, MARGIN_TOP, MARGIN_BOTTOM = 64, 12, 12, 28


class CurvatureGraph(QWidget):
    """Signed curvature k(s) of one curve, with its zero line, inflections and extrema."""

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
        reach = reach * 1.1 if reach > 0 else 1.0
        length = max(float(s[-1]) if s.size else 1.0, 1e-9)
        rect = self._plot_rect()

        def to_x(values):
            return rect.left() + np.asarray(values) / length * rect.width()

        def to_y(values):
            return rect.center().y() - np.asarray(values) / reach * rect.height() / 2

        return to_x, to_y, reach, length

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
        xs, ys = to_x(self.curve.arc_length), to_y(self.curve.curvature)
        # Qt takes points one object each; a curve has a few hundred
        polygon = QPolygonF([QPointF(x, y) for x, y in zip(xs.tolist(), ys.tolist(), strict=True)])
        painter.setPen(QPen(QColor("#6a3d9a"), 1.6))
        painter.drawPolyline(polygon)
        self._markers(
            painter, to_x, to_y, self.curve.inflections.arc_length, np.zeros(len(self.curve.inflections)), "#ff00aa"
        )
        self._markers(painter, to_x, to_y, self.curve.extrema.arc_length, self.curve.extrema.curvature, "#00a0c0")
        painter.setPen(QColor("#333333"))
        painter.drawText(QPointF(4, rect.top() + 10), f"{reach:.3g}")
        painter.drawText(QPointF(4, zero + 4), "0")
        painter.drawText(QPointF(4, rect.bottom()), f"{-reach:.3g}")
        painter.drawText(QPointF(rect.left(), self.height() - 8), "0")
        painter.drawText(QPointF(rect.right() - 90, self.height() - 8), f"s = {length:.1f} mm")
        painter.drawText(QPointF(rect.left() + 80, self.height() - 8), f"k [1/mm] along the curve   {self.title}")

    @staticmethod
    def _markers(painter, to_x, to_y, s, k, colour) -> None:
        painter.setPen(QPen(QColor(colour), 2))
        for x, y in zip(to_x(s), to_y(k), strict=True):
            painter.drawEllipse(QPointF(x, y), 4, 4)
