"""Further CLI commands (selection, alternatives, pins, validation), registered on
the main parser.  Each only calls the library."""
from __future__ import annotations


def add_commands(sub) -> None:
    return None
