"""The command line and the guided question flow: the only package that talks to a person."""

__version__ = "0.1.0"
