"""Machine models, standards' equations and protection setting rules.

This package holds no prompts, no printing and no PDF code: it turns a validated machine description into a
settings record.
"""
