"""The ``boundscape`` command (:mod:`.main`, :mod:`.convert`) and the workflow's steps
(:mod:`.steps`), thin over the layers below."""

from .main import main

__all__ = ["main"]
