"""The session behind the window: model, settings, results, selection. No Qt here."""

from .results import FaceSamples, FindingEntry, Loaded, SeamView
from .session import Session
from .settings import Measure, Mode, SectionSettings, StripeSettings
from .stripes import Camera

__all__ = [
    "Camera",
    "FaceSamples",
    "FindingEntry",
    "Loaded",
    "Measure",
    "Mode",
    "SeamView",
    "SectionSettings",
    "Session",
    "StripeSettings",
]
