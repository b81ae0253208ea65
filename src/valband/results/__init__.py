"""Immutable result objects: what a calculation returns and what writers and plots read."""

from valband.results.bands import BandsResult
from valband.results.channels import Channel
from valband.results.dos import DOSResult

__all__ = ["Channel", "DOSResult", "BandsResult"]
