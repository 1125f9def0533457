"""Annotation: give every pin and top-port bit of a design graph its family, rail and drive kind."""

from linter.annotate.annotation import Annotation, annotate
from linter.annotate.endpoints import DriveKind, Endpoints

__all__ = ["Annotation", "DriveKind", "Endpoints", "annotate"]
