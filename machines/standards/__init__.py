"""Standards' equations and tables only: one module per topic, SI floats in and out, no policy.

Each module's docstring names its section of machines/METHODS.md, where every method is written out with its
equation, variables, source and how sure we are of it.
"""
