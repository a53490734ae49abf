"""Gravity workbench: steady and transient hydraulics of plant gravity-flow systems."""

__version__ = "0.1.0"
