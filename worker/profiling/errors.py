"""Errors the engine raises for a person to read."""

from __future__ import annotations


class ProfileError(Exception):
    """The file cannot be profiled; the message names the reason in plain words."""
