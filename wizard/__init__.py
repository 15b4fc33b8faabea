"""The command line and the guided question flow: the only package that talks to a person."""

from machines import __version__  # noqa: F401  (one version for the command line and the sheet)
