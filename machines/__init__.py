"""Machine models, standards' equations and protection setting rules.

This package holds no prompts, no printing and no PDF code: it turns a validated machine description into a
settings record.
"""

__version__ = "0.1.0"  #: relaywright's version, as in pyproject.toml (tests/test_cli.py checks the installed one)
